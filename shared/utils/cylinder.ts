// The inch is exactly 25.4 mm (as MILLIMETRES_PER_INCH in length.ts); not imported from there, because length.ts
// brings the validation library with it and this file is loaded by the shop's public pages.
const MILLIMETRES_PER_INCH = 25.4

export const cylinderFormats = ['two_minute', 'four_minute'] as const
export type CylinderFormat = (typeof cylinderFormats)[number]

export interface CylinderFormatSpec {
  label: string
  groovesPerInch: number
  /** Length of groove a blank of this format usually carries; the shop may set its own. */
  defaultRecordableLengthIn: number
}

/**
 * The two formats. Recordable lengths are the ones behind the archives' playing times
 * (3.6 in × 100 ÷ 160 rpm = 2.25 min; 3.8 in × 200 ÷ 160 = 4.75 min).
 */
export const cylinderFormatTable: Record<CylinderFormat, CylinderFormatSpec> = {
  two_minute: { label: '2-minute (100 grooves per inch)', groovesPerInch: 100, defaultRecordableLengthIn: 3.6 },
  four_minute: { label: '4-minute (200 grooves per inch)', groovesPerInch: 200, defaultRecordableLengthIn: 3.8 },
}

export const cylinderSpeedsRpm = [120, 144, 160] as const
export const standardCylinderRpm = 160

/** The standard blank (1890s phonograph user guide): about 4 3/16 in long, 2.19 in across, 1/4 in wall. */
export const standardBlankDimensions = {
  lengthIn: 4 + 3 / 16,
  outsideDiameterIn: 2.19,
  wallIn: 0.25,
} as const

function assertPositive(value: number, what: string): void {
  if (!Number.isFinite(value) || value <= 0) throw new RangeError(`${what} must be a positive number, got ${value}`)
}

/** Playing time in minutes = recorded length (in) × grooves per inch ÷ rpm. */
export function playingTimeMinutes(recordedLengthIn: number, groovesPerInch: number, rpm: number): number {
  if (!Number.isFinite(recordedLengthIn) || recordedLengthIn < 0) throw new RangeError(`recorded length must be 0 in or more, got ${recordedLengthIn}`)
  assertPositive(groovesPerInch, 'grooves per inch')
  assertPositive(rpm, 'rpm')
  return (recordedLengthIn * groovesPerInch) / rpm
}

/** Speed of the groove under the stylus, inches per second: π × diameter × rpm ÷ 60. */
export function surfaceSpeedInPerSec(diameterIn: number, rpm: number): number {
  assertPositive(diameterIn, 'diameter')
  assertPositive(rpm, 'rpm')
  return (Math.PI * diameterIn * rpm) / 60
}

export function surfaceSpeedCmPerSec(diameterIn: number, rpm: number): number {
  return (surfaceSpeedInPerSec(diameterIn, rpm) * MILLIMETRES_PER_INCH) / 10
}

/** Turns per second; the once-per-turn (rotary) noise sits at this frequency. */
export function rotationFrequencyHz(rpm: number): number {
  assertPositive(rpm, 'rpm')
  return rpm / 60
}

/** Distance from one groove to the next, in millimetres. */
export function groovePitchMm(groovesPerInch: number): number {
  assertPositive(groovesPerInch, 'grooves per inch')
  return MILLIMETRES_PER_INCH / groovesPerInch
}
