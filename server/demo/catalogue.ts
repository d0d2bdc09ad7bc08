// The invented demo catalogue: blanks by format and wax formula, and a dozen recorded cylinders by
// invented performers. Every photo is drawn here with sharp from an SVG composed in code, and every
// audio sample is made by the WAV generator; nothing comes from elsewhere.
import sharp from 'sharp'
import { count } from 'drizzle-orm'
import { cylinderFormats, standardCylinderRpm } from '#shared/utils/cylinder'
import { defaultEngineSettings } from '#shared/utils/engineSettings'
import { files, productChanges, products } from '../db/schema'
import { encodeWav, makeSeededRandom, makeSurfaceSignal, makeToneSignal } from '../audio/synth'
import type { Storage } from 'unstorage'
import type { Database } from '../utils/platform/db'
import { uploadStorage } from '../utils/platform/uploads'

type NewProduct = typeof products.$inferInsert

interface Palette {
  /** Wax of the cylinder. */
  wax: string
  /** The carton's paper and its label. */
  box: string
  label: string
  /** Backdrop. */
  backdrop: string
}

interface DemoProduct extends Omit<NewProduct, 'photoFileIds' | 'sampleFileId'> {
  slug: string
  palette: Palette
  /** Seeds the tune of the sample: key, tempo and melody. */
  tune?: { rootHz: number, beatsPerMinute: number, seed: number }
}

const SAMPLE_RATE = 22_050
const SAMPLE_SECONDS = 6
// Drawn on a 960 × 640 canvas, rendered at 810 × 540: enough for the shop, and quick to seed.
const PHOTO_WIDTH = 960
const PHOTO_HEIGHT = 640
const PHOTO_SCALE = 810 / 960

const waxColours: Record<string, string> = { stearic_acid: '#1f1a17', paraffin: '#b8792a' }

function demoBlanks(): DemoProduct[] {
  const blankPalettes: Palette[] = [
    { wax: '', box: '#d8c3a0', label: '#6d4c2f', backdrop: '#efe6d6' },
    { wax: '', box: '#cfd8c9', label: '#2f5d4a', backdrop: '#e5ece2' },
  ]
  return defaultEngineSettings.fit.waxFormulas.flatMap(formula => cylinderFormats.map((format, formatIndex): DemoProduct => {
    const minutes = format === 'two_minute' ? '2-minute' : '4-minute'
    const hard = formula.id === 'stearic_acid'
    return {
      slug: `plain-blank-${minutes}-${formula.id.replace(/_/g, '-')}`,
      kind: 'blank',
      title: `Plain blank, ${minutes}, ${hard ? 'hard stearic wax' : 'paraffin blend'}`,
      performer: null,
      description: hard
        ? `A ${minutes} blank cast from our hard stearic-acid wax, reamed to seat on the standard mandrel, shaved to a fresh surface and played through once for surface and once-per-turn noise before it is boxed. For home recording with a ${minutes} recorder.`
        : `A ${minutes} blank of a softer paraffin blend: kinder to an old cutting stylus and good for practice, but it takes heat badly. Reamed, shaved and listened to like every blank; shipped in cool weather only.`,
      format,
      rpm: standardCylinderRpm,
      material: `${formula.label} wax${hard ? ' (hard, black)' : ' blend (amber)'}`,
      condition: 'new',
      runningTimeS: null,
      priceMinor: defaultEngineSettings.prices.blankMinor[format],
      // Counted from the register once the demo workshop's blanks are in (seedDemo ends with the count).
      stock: 0,
      stockSource: 'register',
      editionSize: null,
      madeToOrder: false,
      hidden: false,
      photoAlt: `A plain ${hard ? 'black' : 'amber'} wax cylinder lying in front of its ${formatIndex === 0 ? 'tan' : 'grey-green'} carton`,
      palette: { ...blankPalettes[formatIndex]!, wax: waxColours[formula.id] ?? '#3a2a1e' },
    }
  }))
}

const recorded = (entry: Omit<DemoProduct, 'kind' | 'condition' | 'hidden' | 'editionSize' | 'madeToOrder'> & Partial<Pick<DemoProduct, 'hidden' | 'editionSize' | 'madeToOrder'>>): DemoProduct => ({
  kind: 'recorded',
  condition: 'new',
  hidden: false,
  editionSize: null,
  madeToOrder: false,
  ...entry,
})

/** The demo's wax formulas: the recordings are cut on the hard stearic wax; a plain blank is of the wax it names. */
function demoWaxFormulaId(product: DemoProduct): string {
  return defaultEngineSettings.fit.waxFormulas.find(formula => product.kind === 'blank' && product.material?.startsWith(formula.label))?.id ?? 'stearic_acid'
}

const blackWax = 'Stearic acid wax (hard, black)'
const brownWax = 'Stearic acid wax with carnauba (hard, brown)'

/** A dozen invented titles by invented performers. */
const demoRecordings: DemoProduct[] = [
  recorded({
    slug: 'tallow-yard-two-step',
    title: 'Tallow Yard Two-Step',
    performer: 'The Lowmere Brass Quartet',
    description: 'A brisk two-step for cornet, tenor horn, euphonium and tuba, cut in one take into the big horn. Bright and loud; a little hiss between phrases.',
    format: 'two_minute', rpm: 160, material: blackWax, runningTimeS: 128, priceMinor: 3400, stock: 6, editionSize: 50,
    photoAlt: 'A black wax cylinder in front of a red carton with a cream label band',
    palette: { wax: '#1d1916', box: '#b23a2e', label: '#f3e6c8', backdrop: '#f4ece0' },
    tune: { rootHz: 392, beatsPerMinute: 132, seed: 11 },
  }),
  recorded({
    slug: 'moth-and-mandrel-waltz',
    title: 'Moth and Mandrel Waltz',
    performer: 'The Lowmere Brass Quartet',
    description: 'A slow waltz on a 4-minute surface, cut for each order on a blank that has passed its surface test. Allow about three weeks.',
    format: 'four_minute', rpm: 160, material: blackWax, runningTimeS: 260, priceMinor: 4200, stock: 10, madeToOrder: true,
    photoAlt: 'A black wax cylinder in front of a plum carton with a gold label band',
    palette: { wax: '#1d1916', box: '#5e2a4f', label: '#e3c567', backdrop: '#f1e9ee' },
    tune: { rootHz: 294, beatsPerMinute: 96, seed: 12 },
  }),
  recorded({
    slug: 'lanternlight-on-the-ferrow',
    title: 'Lanternlight on the Ferrow',
    performer: 'Ysolde Pennycress, soprano, with parlour piano',
    description: 'A river song with a clear, forward voice; the piano sits back, as it does on acoustic cuts. Numbered edition of 40.',
    format: 'four_minute', rpm: 160, material: brownWax, runningTimeS: 235, priceMinor: 4500, stock: 4, editionSize: 40,
    photoAlt: 'A brown wax cylinder in front of a deep blue carton with a pale yellow label band',
    palette: { wax: '#4a2f1c', box: '#1f3f73', label: '#f2e7a8', backdrop: '#e9eef5' },
    tune: { rootHz: 523, beatsPerMinute: 84, seed: 13 },
  }),
  recorded({
    slug: 'reel-for-a-cracked-mandrel',
    title: 'Reel for a Cracked Mandrel',
    performer: 'The Saltmarrow Banjo Trio',
    description: 'Three banjos at full tilt. The edition of 30 has sold out; we do not plan a second cutting.',
    format: 'two_minute', rpm: 160, material: blackWax, runningTimeS: 122, priceMinor: 3200, stock: 0, editionSize: 30,
    photoAlt: 'A black wax cylinder in front of a mustard carton with a dark brown label band',
    palette: { wax: '#1d1916', box: '#c99a2e', label: '#4a2c17', backdrop: '#f6efdc' },
    tune: { rootHz: 440, beatsPerMinute: 150, seed: 14 },
  }),
  recorded({
    slug: 'nine-candles-for-wrenhaven',
    title: 'Nine Candles for Wrenhaven',
    performer: 'The Wrenhaven Mandolin Club',
    description: 'Eight mandolins and a mandola, recorded at 144 rpm for a longer take: set your machine to 144 rpm for the right pitch.',
    format: 'four_minute', rpm: 144, material: brownWax, runningTimeS: 280, priceMinor: 4400, stock: 3,
    photoAlt: 'A brown wax cylinder in front of a teal carton with an ivory label band',
    palette: { wax: '#4a2f1c', box: '#1f6f6a', label: '#f5efe0', backdrop: '#e4f0ee' },
    tune: { rootHz: 659, beatsPerMinute: 120, seed: 15 },
  }),
  recorded({
    slug: 'slow-air-for-a-warm-workshop',
    title: 'Slow Air for a Warm Workshop',
    performer: 'Tobiah Fennick, concertina',
    description: 'A quiet air on a 2-minute surface at 144 rpm. The quietest playing in the catalogue, so the surface noise is more noticeable.',
    format: 'two_minute', rpm: 144, material: blackWax, runningTimeS: 145, priceMinor: 3000, stock: 8,
    photoAlt: 'A black wax cylinder in front of a sage green carton with a rust label band',
    palette: { wax: '#1d1916', box: '#7d9a6a', label: '#a2492b', backdrop: '#eef2e8' },
    tune: { rootHz: 349, beatsPerMinute: 72, seed: 16 },
  }),
  recorded({
    slug: 'ballad-of-the-shaving-knife',
    title: 'Ballad of the Shaving Knife',
    performer: 'Corwen Ashgrove, baritone',
    description: 'A workshop ballad, sung close to the horn. Cut to order on a tested 4-minute blank.',
    format: 'four_minute', rpm: 160, material: blackWax, runningTimeS: 220, priceMinor: 4000, stock: 12, madeToOrder: true,
    photoAlt: 'A black wax cylinder in front of a slate grey carton with an orange label band',
    palette: { wax: '#1d1916', box: '#4b5563', label: '#e8833a', backdrop: '#eceef1' },
    tune: { rootHz: 220, beatsPerMinute: 90, seed: 17 },
  }),
  recorded({
    slug: 'the-lamplighters-ledger',
    title: 'The Lamplighter\'s Ledger (recitation)',
    performer: 'Marisol Thackery-Vane, spoken word',
    description: 'A short comic recitation about a lamplighter who counts everything. Spoken word suits the 2-minute surface well.',
    format: 'two_minute', rpm: 160, material: brownWax, runningTimeS: 118, priceMinor: 2800, stock: 5,
    photoAlt: 'A brown wax cylinder in front of a cream carton with a green label band',
    palette: { wax: '#4a2f1c', box: '#efe2c4', label: '#2f6b3a', backdrop: '#f7f1e4' },
    tune: { rootHz: 330, beatsPerMinute: 100, seed: 18 },
  }),
  recorded({
    slug: 'orchard-steps-march',
    title: 'Orchard Steps March',
    performer: 'The Carrowdene Town Band',
    description: 'A march cut at 120 rpm so the full band fits on a 2-minute surface; play it at 120 rpm.',
    format: 'two_minute', rpm: 120, material: blackWax, runningTimeS: 170, priceMinor: 3600, stock: 7,
    photoAlt: 'A black wax cylinder in front of a navy carton with a red label band',
    palette: { wax: '#1d1916', box: '#23305c', label: '#c23b35', backdrop: '#e8ebf3' },
    tune: { rootHz: 466, beatsPerMinute: 116, seed: 19 },
  }),
  recorded({
    slug: 'whistling-study-no-3',
    title: 'Whistling Study No. 3',
    performer: 'Perpetua Oakhollow, whistler',
    description: 'Taken off sale while we re-cut it: the last batch tested marginal for once-per-turn noise.',
    format: 'two_minute', rpm: 160, material: blackWax, runningTimeS: 105, priceMinor: 2600, stock: 4, hidden: true,
    photoAlt: 'A black wax cylinder in front of a sky blue carton with a white label band',
    palette: { wax: '#1d1916', box: '#5b9bd5', label: '#fbfbf7', backdrop: '#eaf2f9' },
    tune: { rootHz: 880, beatsPerMinute: 108, seed: 20 },
  }),
  recorded({
    slug: 'low-tide-at-gannet-row',
    title: 'Low Tide at Gannet Row',
    performer: 'The Quillon String Trio',
    description: 'Violin, viola and cello in a slow seaside piece. Numbered edition of 25.',
    format: 'four_minute', rpm: 160, material: brownWax, runningTimeS: 275, priceMinor: 4600, stock: 2, editionSize: 25,
    photoAlt: 'A brown wax cylinder in front of a sea green carton with a sand label band',
    palette: { wax: '#4a2f1c', box: '#2e7d6b', label: '#e9d8a6', backdrop: '#e6f1ed' },
    tune: { rootHz: 262, beatsPerMinute: 78, seed: 21 },
  }),
  recorded({
    slug: 'copperkettle-polka',
    title: 'Copperkettle Polka',
    performer: 'The Mossbrook Accordion Band',
    description: 'Four accordions and a bass drum. Cut to order on a tested 4-minute blank.',
    format: 'four_minute', rpm: 160, material: blackWax, runningTimeS: 190, priceMinor: 3800, stock: 15, madeToOrder: true,
    photoAlt: 'A black wax cylinder in front of a copper carton with a black label band',
    palette: { wax: '#1d1916', box: '#b8643a', label: '#26211d', backdrop: '#f5ebe3' },
    tune: { rootHz: 587, beatsPerMinute: 140, seed: 22 },
  }),
]

export function demoCatalogue(): DemoProduct[] {
  return [...demoBlanks(), ...demoRecordings]
}

/** Mix `colour` toward white (amount > 0) or black (amount < 0). */
function shade(colour: string, amount: number): string {
  const value = Number.parseInt(colour.slice(1), 16)
  const channel = (shift: number) => {
    const c = (value >> shift) & 0xff
    const mixed = amount >= 0 ? c + (255 - c) * amount : c * (1 + amount)
    return Math.round(Math.max(0, Math.min(255, mixed))).toString(16).padStart(2, '0')
  }
  return `#${channel(16)}${channel(8)}${channel(0)}`
}

/** A carton standing at (x, top), `width` wide; `plain` leaves off the label. */
function cartonSvg(palette: Palette, x: number, top: number, width: number, height: number, plain: boolean, id: string): string {
  const cx = x + width / 2
  const lidRy = width * 0.12
  const labelTop = top + height * 0.32
  const labelHeight = height * 0.3
  const label = plain
    ? `<rect x="${x}" y="${labelTop + labelHeight * 0.4}" width="${width}" height="${labelHeight * 0.18}" fill="${shade(palette.box, -0.25)}"/>`
    : `<rect x="${x}" y="${labelTop}" width="${width}" height="${labelHeight}" fill="${palette.label}"/>
       <rect x="${x}" y="${labelTop + 6}" width="${width}" height="3" fill="${palette.box}" opacity="0.8"/>
       <rect x="${x}" y="${labelTop + labelHeight - 9}" width="${width}" height="3" fill="${palette.box}" opacity="0.8"/>
       <circle cx="${cx}" cy="${labelTop + labelHeight / 2}" r="${labelHeight * 0.28}" fill="none" stroke="${palette.box}" stroke-width="4"/>
       <circle cx="${cx}" cy="${labelTop + labelHeight / 2}" r="${labelHeight * 0.12}" fill="${palette.box}"/>
       ${[0.18, 0.26, 0.74, 0.82].map(f => `<rect x="${x + width * f - 2}" y="${labelTop + labelHeight * 0.35}" width="4" height="${labelHeight * 0.3}" fill="${palette.box}" opacity="0.7"/>`).join('')}`
  return `
    <defs>
      <linearGradient id="${id}-shade" x1="0" x2="1" y1="0" y2="0">
        <stop offset="0" stop-color="#000" stop-opacity="0.35"/>
        <stop offset="0.35" stop-color="#fff" stop-opacity="0.12"/>
        <stop offset="0.6" stop-color="#000" stop-opacity="0"/>
        <stop offset="1" stop-color="#000" stop-opacity="0.4"/>
      </linearGradient>
    </defs>
    <ellipse cx="${cx}" cy="${top + height}" rx="${width / 2}" ry="${lidRy}" fill="${shade(palette.box, -0.3)}"/>
    <rect x="${x}" y="${top}" width="${width}" height="${height}" fill="${palette.box}"/>
    ${label}
    <rect x="${x}" y="${top}" width="${width}" height="${height}" fill="url(#${id}-shade)"/>
    <rect x="${x - 6}" y="${top - lidRy}" width="${width + 12}" height="${height * 0.12}" fill="${shade(palette.box, -0.12)}"/>
    <rect x="${x - 6}" y="${top - lidRy}" width="${width + 12}" height="${height * 0.12}" fill="url(#${id}-shade)"/>
    <ellipse cx="${cx}" cy="${top - lidRy}" rx="${width / 2 + 6}" ry="${lidRy}" fill="${shade(palette.box, 0.18)}"/>`
}

/** A cylinder lying on its side: body (grooved once recorded), the open near end showing the tapered bore. */
function cylinderSvg(palette: Palette, x0: number, x1: number, cy: number, radius: number, grooved: boolean, id: string): string {
  const endRx = radius * 0.36
  const grooves: string[] = []
  for (let x = x0 + 10; grooved && x < x1 - 4; x += 6) {
    grooves.push(`<line x1="${x}" y1="${cy - radius + 3}" x2="${x}" y2="${cy + radius - 3}" stroke="${(x / 6) % 2 ? '#ffffff' : '#000000'}" stroke-opacity="${(x / 6) % 2 ? 0.07 : 0.12}" stroke-width="1.4"/>`)
  }
  return `
    <defs>
      <linearGradient id="${id}-body" x1="0" x2="0" y1="0" y2="1">
        <stop offset="0" stop-color="${shade(palette.wax, 0.1)}"/>
        <stop offset="0.22" stop-color="${shade(palette.wax, 0.45)}"/>
        <stop offset="0.4" stop-color="${palette.wax}"/>
        <stop offset="1" stop-color="${shade(palette.wax, -0.55)}"/>
      </linearGradient>
      <radialGradient id="${id}-shadow">
        <stop offset="0.4" stop-color="#000" stop-opacity="0.28"/>
        <stop offset="1" stop-color="#000" stop-opacity="0"/>
      </radialGradient>
    </defs>
    <ellipse cx="${(x0 + x1) / 2}" cy="${cy + radius + 14}" rx="${(x1 - x0) / 2 + 50}" ry="30" fill="url(#${id}-shadow)"/>
    <ellipse cx="${x1}" cy="${cy}" rx="${endRx}" ry="${radius}" fill="${shade(palette.wax, -0.5)}"/>
    <rect x="${x0}" y="${cy - radius}" width="${x1 - x0}" height="${radius * 2}" fill="url(#${id}-body)"/>
    ${grooves.join('')}
    <ellipse cx="${x0}" cy="${cy}" rx="${endRx}" ry="${radius}" fill="${shade(palette.wax, 0.25)}"/>
    <ellipse cx="${x0}" cy="${cy}" rx="${endRx * 0.78}" ry="${radius * 0.78}" fill="${shade(palette.wax, -0.2)}"/>
    <ellipse cx="${x0 + 4}" cy="${cy}" rx="${endRx * 0.66}" ry="${radius * 0.66}" fill="#0d0a08"/>
    <ellipse cx="${x0 + 10}" cy="${cy}" rx="${endRx * 0.46}" ry="${radius * 0.5}" fill="#000" opacity="0.7"/>`
}

function backdropSvg(palette: Palette, id: string): string {
  return `
    <defs>
      <radialGradient id="${id}-bg" cx="0.5" cy="0.35" r="0.8">
        <stop offset="0" stop-color="${shade(palette.backdrop, 0.4)}"/>
        <stop offset="1" stop-color="${shade(palette.backdrop, -0.12)}"/>
      </radialGradient>
    </defs>
    <rect width="${PHOTO_WIDTH}" height="${PHOTO_HEIGHT}" fill="url(#${id}-bg)"/>
    <rect y="${PHOTO_HEIGHT * 0.74}" width="${PHOTO_WIDTH}" height="${PHOTO_HEIGHT * 0.26}" fill="${shade(palette.backdrop, -0.2)}"/>`
}

function svgDocument(body: string): Buffer {
  return Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="${PHOTO_WIDTH * PHOTO_SCALE}" height="${PHOTO_HEIGHT * PHOTO_SCALE}" viewBox="0 0 ${PHOTO_WIDTH} ${PHOTO_HEIGHT}">${body}</svg>`)
}

/** The product's photos as SVG: the cylinder before its carton, and for records the carton alone. */
export function demoPhotoSvgs(product: DemoProduct): Buffer[] {
  const plain = product.kind === 'blank'
  const scene = svgDocument(`${backdropSvg(product.palette, 'a')}
    ${cartonSvg(product.palette, 560, 120, 230, 380, plain, 'a-box')}
    ${cylinderSvg(product.palette, 170, 610, 430, 92, !plain, 'a-cyl')}`)
  if (plain) return [scene]
  const carton = svgDocument(`${backdropSvg(product.palette, 'b')}
    ${cartonSvg(product.palette, 330, 110, 300, 400, false, 'b-box')}`)
  return [scene, carton]
}

async function renderPhoto(svg: Buffer): Promise<Buffer> {
  return await sharp(svg).webp({ quality: 80 }).toBuffer()
}

/**
 * A few seconds of an invented tune with a horn-like tone (a handful of harmonics), band-limited like
 * an acoustic cut, over soft surface noise with a once-per-turn swell and a few clicks. Mono,
 * 22.05 kHz, 16-bit: about 260 kB.
 */
export function demoSampleWav(product: DemoProduct): Uint8Array {
  const tune = product.tune ?? { rootHz: 440, beatsPerMinute: 120, seed: 1 }
  const random = makeSeededRandom(tune.seed)
  const total = Math.round(SAMPLE_SECONDS * SAMPLE_RATE)
  const music = new Float32Array(total)
  const scale = [0, 2, 4, 7, 9, 12, 14, 16]
  const beat = 60 / tune.beatsPerMinute
  let time = 0.25
  let step = 2
  while (time < SAMPLE_SECONDS - 0.4) {
    step = Math.max(0, Math.min(scale.length - 1, step + Math.round((random() - 0.5) * 4)))
    const lengthBeats = random() < 0.25 ? 2 : random() < 0.3 ? 0.5 : 1
    const seconds = Math.min(beat * lengthBeats, SAMPLE_SECONDS - time - 0.2)
    const frequency = tune.rootHz * 2 ** (scale[step]! / 12)
    const start = Math.round(time * SAMPLE_RATE)
    for (const [harmonic, level] of [[1, -8], [2, -15], [3, -21], [4, -28]] as const) {
      if (frequency * harmonic > 4500) continue
      const partial = makeToneSignal({ frequencyHz: frequency * harmonic, seconds, sampleRate: SAMPLE_RATE, peakDbfs: level })
      const attack = 0.02 * SAMPLE_RATE
      for (let i = 0; i < partial.length && start + i < total; i++) {
        const envelope = Math.min(1, i / attack) * Math.exp(-i / (SAMPLE_RATE * seconds * 0.9))
        music[start + i]! += partial[i]! * envelope
      }
    }
    time += beat * lengthBeats
  }
  // An acoustic cut keeps roughly 200 Hz to 4 kHz: one-pole high- and low-pass.
  const highPass = Math.exp((-2 * Math.PI * 200) / SAMPLE_RATE)
  const lowPass = 1 - Math.exp((-2 * Math.PI * 4000) / SAMPLE_RATE)
  let previousIn = 0
  let high = 0
  let low = 0
  const surface = makeSurfaceSignal({ seconds: SAMPLE_SECONDS, sampleRate: SAMPLE_RATE, levelDbfs: -36, colour: 'soft', rpm: product.rpm ?? 160, swellDepth: 0.3, clicks: 3, clickLevelDb: 16, seed: tune.seed })
  const fade = 0.05 * SAMPLE_RATE
  for (let i = 0; i < total; i++) {
    high = highPass * (high + music[i]! - previousIn)
    previousIn = music[i]!
    low += lowPass * (high - low)
    const edge = Math.min(1, i / fade, (total - 1 - i) / fade)
    music[i] = (low + surface.samples[i]!) * edge
  }
  return encodeWav(music, { sampleRate: SAMPLE_RATE, bits: 16, channels: 1 })
}

// The drawing version is in the id: when the drawings or the tune change, bump it and the old files are left behind.
const DEMO_FILES_VERSION = 1
export const demoPhotoId = (slug: string, index: number) => `demo${DEMO_FILES_VERSION}-${slug}-photo-${index + 1}`
export const demoSampleId = (slug: string) => `demo${DEMO_FILES_VERSION}-${slug}-sample`

/**
 * The bytes of one demo file: what the uploads storage already holds under its fixed id (a restart
 * with a fresh database, e.g. every test server), or else made now and written there.
 */
async function demoFile(storage: Storage, id: string, make: () => Promise<Uint8Array> | Uint8Array): Promise<number> {
  const kept = await storage.getItemRaw<Uint8Array>(id).catch(() => null)
  if (kept && kept.byteLength > 0) return kept.byteLength
  const bytes = await make()
  await storage.setItemRaw(id, bytes)
  return bytes.byteLength
}

/**
 * Adds the demo products that are not there yet (by slug), with their photos and samples in the
 * uploads storage under fixed ids, so seeding again reuses rather than piles up.
 */
export async function seedDemoCatalogue(db: Database) {
  const started = performance.now()
  const present = new Set((await db.select({ slug: products.slug }).from(products)).map(row => row.slug))
  const missing = demoCatalogue().filter(product => !present.has(product.slug))
  if (missing.length === 0) return

  const storage = await uploadStorage()
  // sharp draws the photos on its own threads while the samples are computed on this one.
  const prepared = await Promise.all(missing.map(async (product) => {
    const photos = Promise.all(demoPhotoSvgs(product)
      .map((svg, index) => demoFile(storage, demoPhotoId(product.slug, index), () => renderPhoto(svg))))
    const sample = product.kind === 'recorded' ? demoFile(storage, demoSampleId(product.slug), () => demoSampleWav(product)) : null
    const [photoBytes, sampleBytes] = await Promise.all([photos, sample])
    return { product, photoBytes, sampleBytes }
  }))

  await db.transaction(async (tx) => {
    for (const { product, photoBytes, sampleBytes } of prepared) {
      const { palette: _palette, tune: _tune, ...row } = product
      const photoFileIds = photoBytes.map((_, index) => demoPhotoId(product.slug, index))
      const sampleFileId = sampleBytes ? demoSampleId(product.slug) : null
      await tx.insert(files).values([
        ...photoBytes.map((bytes, index) => ({ id: photoFileIds[index]!, purpose: 'photo', mime: 'image/webp', bytes, originalName: `${product.slug}-${index + 1}.webp`, isPublic: true })),
        ...(sampleFileId ? [{ id: sampleFileId, purpose: 'audio', mime: 'audio/wav', bytes: sampleBytes!, originalName: `${product.slug}-sample.wav`, isPublic: true }] : []),
      ]).onConflictDoNothing()
      const [inserted] = await tx.insert(products).values({ ...row, photoFileIds, sampleFileId, waxFormulaId: demoWaxFormulaId(product) })
        .onConflictDoNothing().returning({ id: products.id })
      if (!inserted) continue
      await tx.insert(productChanges).values([
        { productId: inserted.id, field: 'priceMinor', oldValue: null, newValue: String(row.priceMinor) },
        { productId: inserted.id, field: 'stock', oldValue: null, newValue: String(row.stock ?? 0) },
      ])
    }
  })
  const photoCount = prepared.reduce((sum, entry) => sum + entry.photoBytes.length, 0)
  console.info(`[seed] demo catalogue: ${prepared.length} products, ${photoCount} photos, ${prepared.filter(entry => entry.sampleBytes).length} samples in ${((performance.now() - started) / 1000).toFixed(1)} s`)
}

export async function productCount(db: Database): Promise<number> {
  const [row] = await db.select({ n: count() }).from(products)
  return row?.n ?? 0
}
