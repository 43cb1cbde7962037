// Benchmark of the whole-frame correction (issue 3). Prints figures; it is not a timed test.
// Run: node --import tsx scripts/bench/thermal.bench.ts
import os from 'node:os'
import {
  bandRadiance,
  correctFrame,
  frameTables,
  objectTemperature,
  temperatureFromRadiance,
  type Band,
  type FrameParams,
} from '../../shared/thermal/index'

const WIDTH = 640
const HEIGHT = 480
const N = WIDTH * HEIGHT
const RUNS = 60
const TARGET_MS = 10
const TARGET_RATIO = 50
const TARGET_ERROR_K = 0.01

const LWIR: Band = { fromUm: 7.5, toUm: 14 }
const bands: Array<[string, Band]> = [
  ['LWIR 7.5–14 µm', LWIR],
  ['LWIR 8–14 µm', { fromUm: 8, toUm: 14 }],
  ['MWIR 3–5 µm', { fromUm: 3, toUm: 5 }],
]

// A deterministic generator so that runs compare like with like.
function rng(seed: number): () => number {
  let s = seed >>> 0
  return () => {
    s = (s * 1664525 + 1013904223) >>> 0
    return s / 2 ** 32
  }
}

/** A switchgear-like scene: a warm background, a few hot connections and sensor noise, K. */
function sceneFrame(): Float32Array {
  const r = rng(7)
  const a = new Float32Array(N)
  const spots = Array.from({ length: 12 }, () => ({ x: r() * WIDTH, y: r() * HEIGHT, peak: 20 + r() * 600, radius: 5 + r() * 30 }))
  for (let y = 0; y < HEIGHT; y++) {
    for (let x = 0; x < WIDTH; x++) {
      let t = 293 + 15 * (y / HEIGHT) + (r() - 0.5) * 0.2
      for (const s of spots) {
        const d2 = (x - s.x) ** 2 + (y - s.y) ** 2
        t += s.peak * Math.exp(-d2 / (2 * s.radius * s.radius))
      }
      a[y * WIDTH + x] = t
    }
  }
  return a
}

/** Every pixel drawn uniformly from 200–1500 K: defeats any locality in the tables. */
function uniformFrame(): Float32Array {
  const r = rng(11)
  const a = new Float32Array(N)
  for (let i = 0; i < N; i++) a[i] = 200 + 1300 * r()
  return a
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  const m = s.length >> 1
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2
}

/** Median and best of RUNS timed calls, ms. The target is judged on the median. */
function timeFrame(frame: Float32Array, params: FrameParams): { median: number; best: number } {
  const out = new Float32Array(N)
  for (let i = 0; i < 8; i++) correctFrame(frame, { ...params, out })
  const times: number[] = []
  for (let i = 0; i < RUNS; i++) {
    const t0 = performance.now()
    correctFrame(frame, { ...params, out })
    times.push(performance.now() - t0)
  }
  return { median: median(times), best: Math.min(...times) }
}

/** The obvious implementation: per pixel, exact Planck integration and root finding. */
function naivePerPixelMs(frame: Float32Array, emissivity: number, band: Band, sample: number): number {
  const r = rng(3)
  const idx = Array.from({ length: sample }, () => Math.floor(r() * N))
  let sink = 0
  const one = (apparentK: number): number => {
    try {
      return objectTemperature({ apparentK, emissivity, reflectedK: 293.15, transmittance: 0.98, atmosphereK: 295, band })
    } catch {
      return 0 // unexplainable pixel: the fast path returns NaN for it
    }
  }
  for (const i of idx) sink += one(frame[i]!) // warm-up pass
  const passes: number[] = []
  for (let p = 0; p < 5; p++) {
    const t0 = performance.now()
    for (const i of idx) sink += one(frame[i]!)
    passes.push(performance.now() - t0)
  }
  const elapsed = median(passes)
  if (!Number.isFinite(sink)) console.log('(sink)', sink)
  return (elapsed / sample) * N
}

/** Largest |fast − exact| over object temperatures 200–1500 K (and apparent readings 200–1500 K), K. */
function worstError(band: Band): { worst: number; where: string } {
  let worst = 0
  let where = ''
  const reflectedK = 293.15
  for (const eps of [1, 0.95, 0.8, 0.6, 0.4, 0.2]) {
    const objects = new Float32Array(13_001)
    for (let i = 0; i < objects.length; i++) {
      const tObj = 200 + i * 0.1
      objects[i] = temperatureFromRadiance(eps * bandRadiance(tObj, band) + (1 - eps) * bandRadiance(reflectedK, band), band)
    }
    const apparent = new Float32Array(13_001).map((_, i) => 200 + i * 0.1)
    for (const frame of [objects, apparent]) {
      // Scalar ε, and the same ε as a per-pixel grid (Float32, so the exact path uses the rounded value).
      const grid = new Float32Array(frame.length).fill(eps)
      for (const [fast, e] of [
        [correctFrame(frame, { emissivity: eps, reflectedK, band }), eps],
        [correctFrame(frame, { emissivity: grid, reflectedK, band }), grid[0]!],
      ] as const) {
        for (let i = 0; i < frame.length; i++) {
          let exact: number
          try {
            exact = objectTemperature({ apparentK: frame[i]!, emissivity: e, reflectedK, band })
          } catch {
            exact = Number.NaN
          }
          if (Number.isNaN(exact) && Number.isNaN(fast[i]!)) continue
          if (exact < 200 || exact > 1500) continue
          const err = Math.abs(fast[i]! - exact)
          if (!(err <= worst)) {
            worst = err
            where = `ε ${eps}, T_app ${frame[i]!.toFixed(2)} K → ${exact.toFixed(2)} K`
          }
        }
      }
    }
  }
  return { worst, where }
}

const pass = (ok: boolean): string => (ok ? 'PASS' : 'FAIL')

console.log(`thermal.bench — ${os.cpus().length} CPU(s), ${os.cpus()[0]?.model ?? 'unknown'}, Node ${process.version}`)
console.log(`load average ${os.loadavg().map((l) => l.toFixed(2)).join(' ')} (other work on the machine slows every figure)`)
console.log(`frame ${WIDTH} × ${HEIGHT} = ${N} pixels; median of ${RUNS} runs after warm-up\n`)

const t0 = performance.now()
frameTables({ fromUm: 7.6, toUm: 13.9 })
console.log(`one-off table build for a new band: ${(performance.now() - t0).toFixed(1)} ms (cached per band)\n`)

const scene = sceneFrame()
const uniform = uniformFrame()
// Two painted regions (tape and oxidised copper), as a surface mask gives; and a continuous map, the worst case.
const perPixelEps = new Float32Array(N).map((_, i) => (i % WIDTH < WIDTH / 2 ? 0.95 : 0.65))
const noisyEps = (() => {
  const r = rng(5)
  return new Float32Array(N).map(() => 0.6 + 0.4 * r())
})()
let allOk = true

// Warm every path in every band first, so the first band measured is not paying for the JIT.
for (const [, band] of bands) {
  for (let i = 0; i < 5; i++) {
    correctFrame(uniform, { reflectedK: 293.15, band, emissivity: 0.9 })
    correctFrame(scene, { reflectedK: 293.15, band, emissivity: perPixelEps })
    correctFrame(scene, { reflectedK: 293.15, band, emissivity: noisyEps })
  }
  naivePerPixelMs(uniform, 0.9, band, 300)
}

for (const [name, band] of bands) {
  const base = { reflectedK: 293.15, transmittance: 0.98, atmosphereK: 295, band }
  const cases: Array<[string, { median: number; best: number }]> = [
    ['scene, scalar ε', timeFrame(scene, { ...base, emissivity: 0.9 })],
    ['uniform 200–1500 K, scalar ε', timeFrame(uniform, { ...base, emissivity: 0.9 })],
    ['scene, ε grid of two regions', timeFrame(scene, { ...base, emissivity: perPixelEps })],
    ['scene, ε grid, every pixel different', timeFrame(scene, { ...base, emissivity: noisyEps })],
  ]
  const naiveMs = naivePerPixelMs(uniform, 0.9, band, 2000)
  const slowest = Math.max(...cases.map(([, t]) => t.median))
  const ratio = naiveMs / slowest
  const { worst, where } = worstError(band)
  const ok = slowest <= TARGET_MS && ratio >= TARGET_RATIO && worst <= TARGET_ERROR_K
  allOk &&= ok
  const mps = (ms: number): string => (N / 1e6 / (ms / 1000)).toFixed(1)
  console.log(name)
  for (const [label, t] of cases) {
    console.log(`  correctFrame, ${label.padEnd(38)} ${t.median.toFixed(2)} ms median (${mps(t.median)} Mpx/s), best ${t.best.toFixed(2)} ms`)
  }
  console.log(`  naive per-pixel root finding:         ${naiveMs.toFixed(0)} ms per frame (2000 sampled pixels, median of 5 passes, scaled)`)
  console.log(`  speed-up vs naive (slowest fast case): ${ratio.toFixed(0)}×  [target ≥ ${TARGET_RATIO}×] ${pass(ratio >= TARGET_RATIO)}`)
  console.log(`  frame time (slowest case):            ${slowest.toFixed(2)} ms  [target ≤ ${TARGET_MS} ms] ${pass(slowest <= TARGET_MS)}`)
  console.log(`  worst |fast − exact| 200–1500 K:      ${worst.toExponential(2)} K at ${where}  [target ≤ ${TARGET_ERROR_K} K] ${pass(worst <= TARGET_ERROR_K)}\n`)
}
console.log(allOk ? 'all targets met' : 'SOME TARGETS MISSED')
process.exitCode = allOk ? 0 : 1
