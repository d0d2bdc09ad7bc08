/** The home page's copy: what the workshop offers (with a way in, where there is one), and the steps every cylinder goes through. */
export const homeOffers: { title: string, text: string, link?: { to: string, label: string } }[] = [
  { title: 'Blanks for home recording', text: 'Cast in small batches, reamed to seat true on a standard mandrel, shaved to a fresh surface and played through once for noise before they leave the bench.' },
  { title: 'Recorded cylinders', text: 'New performances cut acoustically through a horn, in 2-minute and 4-minute grooves. Every copy is made on a blank whose surface test you can read.' },
  { title: 'Personal messages', text: 'Write a script or send a voice file; we tell you at once whether it fits, cut a proof for you to hear and approve, and only then cut it for good.', link: { to: '/custom', label: 'Write a message' } },
]
export const homeSteps: [string, string][] = [
  ['Cast and ream', 'Each blank is reamed in sets until it sits at the right overhang on the mandrel, at room temperature.'],
  ['Shave', 'A light cut at a time, never deeper than needed, until the surface is continuous and clean.'],
  ['Listen', 'The new surface is played through and recorded; the file is measured for hiss, clicks and once-per-turn swell.'],
  ['Cut and pack', 'Your cylinder is cut, checked, and packed in its own padded tube with heat holds when the weather is against us.'],
]
