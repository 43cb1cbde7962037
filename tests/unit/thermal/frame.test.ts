import { describe, expect, it } from 'vitest'
import { correctFrame, objectTemperature, temperatureFromRadiance, bandRadiance } from '#shared/thermal'

const BANDS = [
  { fromUm: 8, toUm: 14 },
  { fromUm: 7.5, toUm: 14 },
  { fromUm: 3, toUm: 5 },
]

function exact(apparentK: number, eps: number, params: { reflectedK: number; band: { fromUm: number; toUm: number }; transmittance?: number; atmosphereK?: number; window?: { transmittance: number; tempK: number } }): number {
  try {
    return objectTemperature({ ...params, apparentK, emissivity: eps })
  } catch {
    return Number.NaN
  }
}

describe('correctFrame', () => {
  it('agrees with the exact inversion to ≤ 0.01 K for object temperatures 200–1500 K', () => {
    for (const band of BANDS) {
      for (const eps of [1, 0.95, 0.7, 0.4]) {
        const params = { reflectedK: 293.15, band, transmittance: 0.97, atmosphereK: 290 }
        // apparent readings produced by objects spread evenly over 200–1500 K
        const n = 1301
        const app = new Float32Array(n)
        for (let i = 0; i < n; i++) {
          const tObj = 200 + i
          const w = eps * 0.97 * bandRadiance(tObj, band) + (1 - eps) * 0.97 * bandRadiance(293.15, band) + 0.03 * bandRadiance(290, band)
          app[i] = temperatureFromRadiance(w, band)
        }
        const out = correctFrame(app, { ...params, emissivity: eps })
        let worst = 0
        for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(out[i]! - exact(app[i]!, eps, params)))
        expect(worst).toBeLessThanOrEqual(0.01)
      }
    }
  })

  it('agrees with the exact inversion over apparent readings 200–1500 K, with an IR window', () => {
    const band = { fromUm: 7.5, toUm: 14 }
    const params = { reflectedK: 288, band, window: { transmittance: 0.55, tempK: 305 } }
    const n = 2600
    const app = new Float32Array(n)
    for (let i = 0; i < n; i++) app[i] = 200 + (1300 * i) / (n - 1)
    const out = correctFrame(app, { ...params, emissivity: 0.9 })
    for (let i = 0; i < n; i++) {
      const e = exact(app[i]!, 0.9, params)
      if (Number.isNaN(e)) expect(out[i]).toBeNaN()
      else expect(Math.abs(out[i]! - e)).toBeLessThanOrEqual(0.01)
    }
  })

  it('stays within 0.01 K across the steep stretch where the reflection almost outshines the target', () => {
    for (const band of BANDS) {
      const params = { reflectedK: 330, band }
      const n = 4001
      const app = new Float32Array(n).map((_, i) => 300 + (60 * i) / (n - 1))
      const out = correctFrame(app, { ...params, emissivity: 0.1 })
      let compared = 0
      for (let i = 0; i < n; i++) {
        const e = exact(app[i]!, 0.1, params)
        if (Number.isNaN(e)) {
          expect(out[i]).toBeNaN()
          continue
        }
        compared++
        expect(Math.abs(out[i]! - e)).toBeLessThanOrEqual(0.01)
      }
      expect(compared).toBeGreaterThan(n / 4)
      expect(compared).toBeLessThan(n)
    }
  })

  it('takes a per-pixel emissivity grid', () => {
    const band = BANDS[0]!
    const app = new Float32Array([330, 330, 330, 500])
    const eps = new Float32Array([1, 0.8, 0.5, 0.3])
    const out = correctFrame(app, { emissivity: eps, reflectedK: 293.15, band })
    for (let i = 0; i < app.length; i++) {
      expect(Math.abs(out[i]! - exact(app[i]!, eps[i]!, { reflectedK: 293.15, band }))).toBeLessThanOrEqual(0.01)
    }
    expect(() => correctFrame(app, { emissivity: new Float32Array(3), reflectedK: 293.15, band })).toThrow(/one value per pixel/)
  })

  it('stays within 0.01 K with an ε grid painted in regions (a table per surface)', () => {
    for (const band of BANDS) {
      const n = 4000
      const app = new Float32Array(n).map((_, i) => 200 + (1300 * i) / (n - 1))
      const eps = new Float32Array(n).map((_, i) => (i < n / 3 ? 0.95 : i < (2 * n) / 3 ? 0.35 : 0.7))
      const out = correctFrame(app, { emissivity: eps, reflectedK: 293.15, band })
      for (let i = 0; i < n; i++) {
        const e = exact(app[i]!, eps[i]!, { reflectedK: 293.15, band })
        if (Number.isNaN(e)) expect(out[i]).toBeNaN()
        else expect(Math.abs(out[i]! - e)).toBeLessThanOrEqual(0.01)
      }
    }
  })

  it('stays exact with a continuous ε map (more distinct values than composite tables)', () => {
    const band = BANDS[0]!
    const n = 3000
    const app = new Float32Array(n).map((_, i) => 250 + ((i * 7919) % 1000))
    const eps = new Float32Array(n).map((_, i) => 0.3 + 0.7 * (((i * 104729) % 997) / 996))
    const out = correctFrame(app, { emissivity: eps, reflectedK: 293.15, band })
    for (let i = 0; i < n; i++) {
      const e = exact(app[i]!, eps[i]!, { reflectedK: 293.15, band })
      if (Number.isNaN(e)) expect(out[i]).toBeNaN()
      else expect(Math.abs(out[i]! - e)).toBeLessThanOrEqual(0.01)
    }
  })

  it('marks unexplainable pixels and bad ε as NaN instead of throwing, and handles readings outside the tables', () => {
    const band = BANDS[0]!
    const app = new Float32Array([250, 340, Number.NaN, 0])
    const eps = new Float32Array([0.2, 0, 0.9, 0.9])
    const out = correctFrame(app, { emissivity: eps, reflectedK: 320, band })
    expect(out[0]).toBeNaN() // reflection at 320 K outshines a 250 K reading at ε 0.2
    expect(out[1]).toBeNaN() // ε 0 is not allowed
    expect(out[2]).toBeNaN()
    expect(out[3]).toBeNaN()
    const outside = correctFrame(new Float32Array([120, 3500]), { emissivity: 0.95, reflectedK: 100, band })
    const e120 = exact(120, 0.95, { reflectedK: 100, band })
    expect(e120).toBeGreaterThan(100)
    expect(Math.abs(outside[0]! - e120)).toBeLessThan(0.01) // below the table: exact path
    expect(Math.abs(outside[1]! - exact(3500, 0.95, { reflectedK: 100, band }))).toBeLessThan(0.01) // above the table: exact path
  })

  it('is the identity at ε = 1, τ = 1 and writes into a supplied buffer', () => {
    const app = new Float32Array(1000).map((_, i) => 200 + i * 1.3)
    const buf = new Float32Array(1000)
    const out = correctFrame(app, { emissivity: 1, reflectedK: 250, band: BANDS[2]!, out: buf })
    expect(out).toBe(buf)
    for (let i = 0; i < app.length; i++) expect(Math.abs(out[i]! - app[i]!)).toBeLessThan(0.001)
  })

  it('rejects invalid frame-wide parameters with a typed error', () => {
    expect(() => correctFrame(new Float32Array(4), { emissivity: 1.5, reflectedK: 293, band: BANDS[0]! })).toThrow(/Emissivity/)
  })
})
