/*
 * Trade-sensible bounds for the lengths a maker types. They are not measurements: a figure outside
 * them is a slip (a lost decimal point, millimetres typed as inches), so the field refuses it and
 * names the bound. Set wide around the standard blank, about 4 3/16 in long, 2.19 in across, wall
 * about 1/4 in (1890s phonograph user guide, public domain); the margins are common practice, no source.
 */
export const lengthBounds = {
  /** Outside diameters; the largest cylinders made are about 5 in across. */
  diameterIn: { max: 6 },
  /** The bore of a blank, inside its outside diameter. */
  boreIn: { max: 6 },
  /** Overhang readings either side of the mandrel's mark; a blank is about 4 3/16 in long. */
  overhangIn: { min: -4, max: 4 },
  /** A length of groove along the cylinder. */
  recordedLengthIn: { max: 12 },
  /** Seat travel one reaming gives (about 1/16 in). */
  perReamingIn: { min: 1 / 128, max: 1 / 2 },
  /** Radial cuts: in-feed, deepest cut a pass, depth a surface costs, depth to clean up. The wall is about 1/4 in. */
  radialCutIn: { max: 1 / 4 },
  /** Change of diameter per foot of a taper. */
  taperPerFootIn: { max: 3 },
} as const

/** The longest plan the bench writes out step by step; a longer one is an answer of its own. */
export const PLAN_STEPS_MAX = 200
