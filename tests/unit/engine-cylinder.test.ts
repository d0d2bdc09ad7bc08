import { describe, expect, it } from 'vitest'
import {
  cylinderFormatTable,
  cylinderSpeedsRpm,
  groovePitchMm,
  playingTimeMinutes,
  rotationFrequencyHz,
  standardBlankDimensions,
  standardCylinderRpm,
  surfaceSpeedCmPerSec,
  surfaceSpeedInPerSec,
} from '../../shared/utils/cylinder'

describe('playing time', () => {
  // cylinder technical notes of university sound archives; arithmetic
  it('3.6 in at 100 grooves per inch and 160 rpm plays 2.25 min, about 2 min 15 s (cylinder technical notes of university sound archives; arithmetic)', () => {
    expect(playingTimeMinutes(3.6, 100, 160)).toBeCloseTo(2.25, 10)
    expect(playingTimeMinutes(3.6, 100, 160) * 60).toBeCloseTo(135, 8)
  })

  it('3.8 in at 200 grooves per inch and 160 rpm plays 4.75 min (cylinder technical notes of university sound archives; arithmetic)', () => {
    expect(playingTimeMinutes(3.8, 200, 160)).toBeCloseTo(4.75, 10)
  })

  it('the format table gives those playing times at the standard speed', () => {
    const two = cylinderFormatTable.two_minute
    const four = cylinderFormatTable.four_minute
    expect(two.groovesPerInch).toBe(100)
    expect(four.groovesPerInch).toBe(200)
    expect(playingTimeMinutes(two.defaultRecordableLengthIn, two.groovesPerInch, standardCylinderRpm)).toBeCloseTo(2.25, 10)
    expect(playingTimeMinutes(four.defaultRecordableLengthIn, four.groovesPerInch, standardCylinderRpm)).toBeCloseTo(4.75, 10)
  })

  it('a slower speed plays longer', () => {
    expect(playingTimeMinutes(3.6, 100, 120)).toBeCloseTo(3, 10)
    expect(cylinderSpeedsRpm).toEqual([120, 144, 160])
  })

  it('refuses a speed of zero', () => {
    expect(() => playingTimeMinutes(3.6, 100, 0)).toThrow(RangeError)
  })
})

describe('surface speed, rotation and pitch', () => {
  // arithmetic on the above (standard blank: 1890s phonograph user guide)
  it('2.19 in at 160 rpm runs 18.3 in/s, 46.6 cm/s (arithmetic on the above)', () => {
    expect(standardBlankDimensions.outsideDiameterIn).toBe(2.19)
    expect(surfaceSpeedInPerSec(2.19, 160)).toBeCloseTo(18.3, 1)
    expect(surfaceSpeedCmPerSec(2.19, 160)).toBeCloseTo(46.6, 1)
  })

  it('160 rpm turns at 2.67 Hz (arithmetic)', () => {
    expect(rotationFrequencyHz(160)).toBeCloseTo(2.67, 2)
  })

  // 1 in = 25.4 mm exactly (NIST)
  it('groove pitch is 0.254 mm at 100 per inch and 0.127 mm at 200 (1 in = 25.4 mm exactly, NIST)', () => {
    expect(groovePitchMm(100)).toBeCloseTo(0.254, 12)
    expect(groovePitchMm(200)).toBeCloseTo(0.127, 12)
  })

  it('the standard blank is about 4 3/16 in long with a 1/4 in wall (1890s phonograph user guide)', () => {
    expect(standardBlankDimensions.lengthIn).toBe(4.1875)
    expect(standardBlankDimensions.wallIn).toBe(0.25)
  })
})
