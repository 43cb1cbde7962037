// Benchmark of a temperature grid's path on screen (issue 5): parse a 640 × 480 CSV, re-correct every pixel with
// correctFrame, map the result to RGBA with a colour map. Prints figures; it is not a timed test.
// Run: node --import tsx scripts/bench/grid.bench.ts
import os from 'node:os'
import { objectTemperature, type Band } from '../../shared/thermal/index'
import { GridCorrector, finiteRange, parseGridCsv } from '../../shared/thermal/grid'
import { valuesToRgba } from '../../shared/thermal/colormaps'

const WIDTH = 640
const HEIGHT = 480
const N = WIDTH * HEIGHT
const RUNS = 15
// What "feels live" while an ε field is typed in or a slider moves: one screen refresh at 60 Hz is 16.7 ms; the
// correction and the drawing together within it leave the browser its own time (common practice for interactive UIs).
const LIVE_MS = 16.7
const BAND: Band = { fromUm: 7.5, toUm: 14 }

function rng(seed: number): () => number {
  let s = seed >>> 0
  return () => {
    s = (s * 1664525 + 1013904223) >>> 0
    return s / 2 ** 32
  }
}

/** A switchgear-like scene in °C: warm background, a few hot connections, sensor noise; as CSV with two decimals. */
function sceneCsv(separator: string, decimalComma = false): string {
  const r = rng(7)
  const spots = Array.from({ length: 10 }, () => ({ x: r() * WIDTH, y: r() * HEIGHT, peak: 10 + r() * 150, radius: 4 + r() * 25 }))
  const lines: string[] = []
  for (let y = 0; y < HEIGHT; y++) {
    const row: string[] = []
    for (let x = 0; x < WIDTH; x++) {
      let t = 18 + 8 * (y / HEIGHT) + (r() - 0.5) * 0.3
      for (const s of spots) t += s.peak * Math.exp(-((x - s.x) ** 2 + (y - s.y) ** 2) / (2 * s.radius * s.radius))
      const text = t.toFixed(2)
      row.push(decimalComma ? text.replace('.', ',') : text)
    }
    lines.push(row.join(separator))
  }
  return `${lines.join('\n')}\n`
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  const m = s.length >> 1
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2
}

/**
 * Median and best wall time of `runs` calls, and the median CPU time of this process over the same calls. On a busy
 * machine the wall time includes waiting for a core; the CPU time is what the work itself cost.
 */
function time(fn: () => void, runs = RUNS): { median: number; best: number; cpu: number } {
  for (let i = 0; i < 3; i++) fn()
  const t: number[] = []
  const c: number[] = []
  for (let i = 0; i < runs; i++) {
    const c0 = process.cpuUsage()
    const t0 = performance.now()
    fn()
    t.push(performance.now() - t0)
    const dc = process.cpuUsage(c0)
    c.push((dc.user + dc.system) / 1000)
  }
  return { median: median(t), best: Math.min(...t), cpu: median(c) }
}

const fmt = (t: { median: number; best: number; cpu: number }) =>
  `${t.median.toFixed(2).padStart(8)} ms median, best ${t.best.toFixed(2)} ms, CPU ${t.cpu.toFixed(2)} ms median`

console.log(`grid.bench — ${os.cpus().length} CPU(s), ${os.cpus()[0]?.model ?? 'unknown'}, Node ${process.version}`)
console.log(`load average ${os.loadavg().map((l) => l.toFixed(2)).join(' ')} (other work on the machine slows every figure)`)
console.log(`grid ${WIDTH} × ${HEIGHT} = ${N} pixels; median of ${RUNS} runs after warm-up\n`)

const csvComma = sceneCsv(',')
const csvSemi = sceneCsv(';', true)
console.log(`CSV text: ${(csvComma.length / 1e6).toFixed(2)} M characters (comma, two decimals)`)

// 1. Parse.
let grid = null as ReturnType<typeof parseGridCsv> | null
const parseComma = time(() => { grid = parseGridCsv(csvComma, 'C') })
const parseSemi = time(() => { parseGridCsv(csvSemi, 'C') })
const parseF = time(() => { parseGridCsv(csvComma, 'F') })
if (!grid || !grid.ok) throw new Error('the benchmark grid did not parse')
const valuesC = grid.grid.valuesC
// Baseline for the parser: the obvious split-and-Number() reading with the same checks on shape.
const parseNaive = time(() => {
  const rows = csvComma.trimEnd().split(/\r?\n/)
  const out = new Float32Array(rows.length * rows[0]!.split(',').length)
  let k = 0
  for (const row of rows) for (const cell of row.split(',')) {
    const v = Number(cell)
    if (!Number.isFinite(v)) throw new Error('bad cell')
    out[k++] = v
  }
})
console.log('\nparse (shared/thermal/grid.ts parseGridCsv)')
console.log(`  comma, °C:                        ${fmt(parseComma)}`)
console.log(`  semicolon + decimal comma, °C:    ${fmt(parseSemi)}`)
console.log(`  comma, °F → °C:                   ${fmt(parseF)}`)
console.log(`  baseline split + Number():        ${fmt(parseNaive)}`)

// 2. Correct every pixel (what moving the ε control costs).
const corrector = new GridCorrector(valuesC)
let eps = 0.95
const correct = time(() => {
  eps = eps === 0.95 ? 0.9 : 0.95 // alternate, as a person changing ε does
  corrector.correct({ emissivity: eps, reflectedC: 20, transmittance: 0.98, atmosphereC: 18, band: BAND })
})
// Baseline: the engine's exact single-value function per pixel (Planck integration and root finding), sampled and scaled.
const r = rng(3)
const sample = Array.from({ length: 2000 }, () => Math.floor(r() * N))
const naivePass = () => {
  let sink = 0
  for (const i of sample) {
    sink += objectTemperature({ apparentK: valuesC[i]! + 273.15, emissivity: 0.95, reflectedK: 293.15, transmittance: 0.98, atmosphereK: 291.15, band: BAND })
  }
  return sink
}
const naive = time(() => { naivePass() }, 5)
const naiveFrameMs = (naive.median / sample.length) * N
const naiveFrameCpu = (naive.cpu / sample.length) * N
console.log('\ncorrect (GridCorrector → correctFrame, ε alternating 0.95 / 0.9, τ 0.98, LWIR 7.5–14 µm)')
console.log(`  correctFrame + °C↔K:              ${fmt(correct)}`)
console.log(`  baseline objectTemperature/pixel: ${naiveFrameMs.toFixed(0).padStart(8)} ms per grid, CPU ${naiveFrameCpu.toFixed(0)} ms (2000 sampled pixels, median of 5, scaled)`)
console.log(`  speed-up:                         ${(naiveFrameMs / correct.median).toFixed(0).padStart(8)}× wall, ${(naiveFrameCpu / correct.cpu).toFixed(0)}× CPU`)

// 3. Colour map to RGBA (what the canvas receives), with the scale's range.
const corrected = corrector.correct({ emissivity: 0.95, reflectedC: 20, band: BAND })
const rgba = new Uint8ClampedArray(4 * N)
const draw = time(() => {
  const range = finiteRange(corrected)!
  valuesToRgba(corrected, range.min, range.max, 'inferno', rgba)
})
// Baseline: per pixel, the byte-by-byte way with Math.round and Math.min/max.
const drawNaive = time(() => {
  const range = finiteRange(corrected)!
  const lut = [...Array(256).keys()].map((i) => [i, 255 - i, i >> 1, 255])
  for (let i = 0; i < N; i++) {
    const k = Math.max(0, Math.min(255, Math.round(((corrected[i]! - range.min) / (range.max - range.min)) * 255)))
    const c = lut[k]!
    rgba[4 * i] = c[0]!
    rgba[4 * i + 1] = c[1]!
    rgba[4 * i + 2] = c[2]!
    rgba[4 * i + 3] = c[3]!
  }
})
console.log('\ndraw to RGBA (range + valuesToRgba, inferno)')
console.log(`  32-bit LUT writes:                ${fmt(draw)}`)
console.log(`  baseline per-byte writes:         ${fmt(drawNaive)}`)

const live = correct.median + draw.median
const liveCpu = correct.cpu + draw.cpu
console.log(`\nε change → new picture (correct + draw; the browser's putImageData not included):`)
console.log(`  wall ${live.toFixed(2)} ms median, CPU ${liveCpu.toFixed(2)} ms median  [live ≤ ${LIVE_MS} ms, judged on CPU time] ${liveCpu <= LIVE_MS ? 'PASS' : 'FAIL'}`)
console.log(`whole path once (parse + correct + draw): wall ${(parseComma.median + correct.median + draw.median).toFixed(1)} ms, CPU ${(parseComma.cpu + correct.cpu + draw.cpu).toFixed(1)} ms (medians)`)
process.exitCode = liveCpu <= LIVE_MS ? 0 : 1
