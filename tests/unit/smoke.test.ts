import { describe, expect, it } from 'vitest'

describe('unit project', () => {
  it('runs', () => {
    expect(1 + 1).toBe(2)
  })
})
