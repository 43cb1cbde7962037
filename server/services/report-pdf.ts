// The survey report's layout, drawn with pdfkit. Pure: no Nitro, no database — it takes the report's data, the
// fonts and an image loader, so the unit tests and the benchmark can run it as it is.
import { inflateSync } from 'node:zlib'
import PDFDocument from 'pdfkit'
import type { ChainStep, ChainValue } from '../../shared/thermal/chain'
import { SAFETY_CAUTION } from '../../shared/thermal/safety'
import { REPORT_DISCLAIMER } from '../../shared/report'
import {
  deltaSymbol, formatDelta, formatLength, formatNumber, formatTemperature, temperatureSymbol, type LengthUnit, type TemperatureUnit,
} from '../../shared/units'

/** Manrope (SIL OFL, shipped with the app in server/assets/fonts) as WOFF: pdfkit's fontkit reads WOFF, not WOFF2. */
export interface ReportFonts {
  latin: { regular: Uint8Array; bold: Uint8Array }
  latinExt: { regular: Uint8Array; bold: Uint8Array }
  greek: { regular: Uint8Array; bold: Uint8Array }
}

/** One image of a finding, ready to embed (JPEG or PNG bytes). */
export interface ReportImage {
  kind: 'infrared' | 'visible'
  data: Uint8Array
  fileName: string
}

export interface ReportWorkOrder { number: number; state: string; stateLabel: string; dueOn: string | null }

export interface ReportFinding {
  number: number
  id: string
  site: string
  assetLabel: string
  assetClass: string
  component: string
  phase: string
  /** The reading as typed (°C, m, A, m/s). */
  inputs: {
    apparentC: number; referenceC: number | null; ambientC: number | null; emissivity: number; reflectedC: number; reflectedMethod: string
    distanceM: number | null; transmittance: number | null; windowTransmittance: number | null; windowC: number | null
    loadA: number | null; ratedA: number | null; windMs: number | null
  }
  /** The correction chain re-run from the stored inputs; null when the engine could not rebuild it. */
  chain: ChainStep[] | null
  objectC: number
  intervalC: { low: number; high: number } | null
  riseOverReferenceK: number | null
  riseOverAmbientK: number | null
  loadScaledRiseK: number | null
  band: number | null
  bandBasis: string | null
  reviewedBand: number | null
  reviewReason: string | null
  action: string
  repairDeadlineDays: number | null
  /** Survey date + deadline, YYYY-MM-DD. */
  repairBy: string | null
  probableCause: string
  causeNotes: string
  notes: string
  warnings: Array<{ severity: string; message: string }>
  criteria: string
  /** undefined: work orders are not recorded in this installation; null: no work order yet. */
  workOrder?: ReportWorkOrder | null
  imageCount: number
}

export interface ReportInventoryAsset {
  label: string
  assetClass: string
  outcome: 'clear' | 'finding' | 'not_reached' | 'unchecked'
  reason: string | null
  note: string
  findingNumbers: number[]
}

export interface ReportSite {
  code: string
  name: string
  conditions: { ambientC: number | null; windMs: number | null; humidityPct: number | null; sky: string | null; loadNotes: string }
  safetyNotes: string
  assets: ReportInventoryAsset[]
}

/** Everything the report prints; built by server/services/survey-reports.ts. */
export interface ReportData {
  reportId: string
  organisation: string
  survey: {
    id: string; plannedFor: string; startedAt: string | null; submittedAt: string | null; reviewedAt: string | null
    reviewedBy: string | null; reviewComments: string; routeName: string | null
  }
  thermographer: { name: string; qualification: string }
  instrument: {
    label: string; band: string; accuracy: string; ifovMrad: number | null; calibrationDue: string | null
    /** The calibration date had passed on the survey date. */
    calibrationOverdue: boolean
  }
  criteria: string[]
  sites: ReportSite[]
  findings: ReportFinding[]
  counts: { assets: number; clear: number; finding: number; notReached: number; unchecked: number }
  generatedAt: string
  generatedBy: string
  units: { temperature: TemperatureUnit; length: LengthUnit }
  includeImages: boolean
}

export interface RenderResult { pdf: Buffer; pages: number; images: number }

// Look: graphite and stone neutrals, severity from stops of the inferno colour map (product brief).
const INK = '#1c1917' // stone-900
const GRAPHITE = '#292524' // stone-800
const MUTED = '#57534e' // stone-600
const RULE = '#d6d3d1' // stone-300
const PANEL = '#f5f5f4' // stone-100
const BAND_FILL: Record<number, string> = { 1: '#A52C60', 2: '#E35933', 3: '#FB9B06', 4: '#F6D746' }
const BAND_INK: Record<number, string> = { 1: '#ffffff', 2: '#1c1917', 3: '#1c1917', 4: '#1c1917' }
const SLATE = '#64748B'

const MARGIN = 48
const A4: [number, number] = [595.28, 841.89]
const TNUM = ['tnum']

type Face = 'regular' | 'bold'
interface CellFill { bg: string; ink: string }
const bandFill = (b: number | null): CellFill => (b ? { bg: BAND_FILL[b]!, ink: BAND_INK[b]! } : { bg: SLATE, ink: '#ffffff' })
type Script = 'latin' | 'latinExt' | 'greek'

// Glyphs none of the shipped subsets hold, written in plain characters instead.
const FALLBACK: Record<string, string> = { '⁴': '^4', 'ⁿ': '^n', '→': '->', '≥': '>=', '≤': '<=', '≈': '~', '…': '...' }

function scriptOf(cp: number): Script {
  if (cp >= 0x0370 && cp <= 0x03ff) return 'greek'
  if ((cp >= 0x0100 && cp <= 0x02ba && cp !== 0x0131 && cp !== 0x0152 && cp !== 0x0153) || (cp >= 0x1e00 && cp <= 0x1eff) || (cp >= 0xa720 && cp <= 0xa7ff)) return 'latinExt'
  return 'latin'
}

/** Splits text into runs of one font subset each (Manrope ships as per-script subsets). */
export function scriptRuns(text: string): Array<{ script: Script; text: string }> {
  const clean = [...text].map((c) => FALLBACK[c] ?? c).join('')
  const runs: Array<{ script: Script; text: string }> = []
  for (const ch of clean) {
    const s = scriptOf(ch.codePointAt(0)!)
    const last = runs[runs.length - 1]
    if (last && last.script === s) last.text += ch
    else runs.push({ script: s, text: ch })
  }
  return runs
}

const fontName = (script: Script, face: Face) => `${script}-${face}`

const sfntCache = new WeakMap<Uint8Array, Buffer>()

/**
 * A WOFF font unpacked to the plain sfnt (TTF/OTF) it wraps. fontkit reads WOFF, but inflates a table again on every
 * access, which made text layout several times slower; unpacked once per process, the shipped file stays a WOFF.
 */
export function woffToSfnt(woff: Uint8Array): Buffer {
  const cached = sfntCache.get(woff)
  if (cached) return cached
  const src = Buffer.from(woff.buffer, woff.byteOffset, woff.byteLength)
  if (src.toString('latin1', 0, 4) !== 'wOFF') return src
  const numTables = src.readUInt16BE(12)
  const tables = Array.from({ length: numTables }, (_, i) => {
    const e = 44 + i * 20
    const [offset, compLength, origLength] = [src.readUInt32BE(e + 4), src.readUInt32BE(e + 8), src.readUInt32BE(e + 12)]
    const raw = src.subarray(offset, offset + compLength)
    return { tag: src.subarray(e, e + 4), checksum: src.readUInt32BE(e + 16), data: compLength < origLength ? inflateSync(raw) : raw }
  })
  const pad = (n: number) => (n + 3) & ~3
  const headerSize = 12 + 16 * numTables
  const out = Buffer.alloc(headerSize + tables.reduce((sum, t) => sum + pad(t.data.length), 0))
  const log2 = Math.floor(Math.log2(numTables))
  out.writeUInt32BE(src.readUInt32BE(4), 0) // flavour: TrueType or CFF outlines
  out.writeUInt16BE(numTables, 4)
  out.writeUInt16BE(2 ** log2 * 16, 6)
  out.writeUInt16BE(log2, 8)
  out.writeUInt16BE(numTables * 16 - 2 ** log2 * 16, 10)
  let at = headerSize
  tables.forEach((t, i) => {
    const r = 12 + i * 16
    t.tag.copy(out, r)
    out.writeUInt32BE(t.checksum, r + 4)
    out.writeUInt32BE(at, r + 8)
    out.writeUInt32BE(t.data.length, r + 12)
    t.data.copy(out, at)
    at += pad(t.data.length)
  })
  sfntCache.set(woff, out)
  return out
}

class Report {
  doc: PDFKit.PDFDocument
  face: Face = 'regular'
  size = 9.5
  images = 0
  readonly t: TemperatureUnit
  readonly l: LengthUnit

  constructor(readonly data: ReportData, fonts: ReportFonts) {
    // font: null keeps pdfkit from loading its Helvetica metrics files (not shipped in the build).
    this.doc = new PDFDocument({
      size: A4, margin: MARGIN, bufferPages: false, font: null as unknown as string, autoFirstPage: true,
      info: { Title: `Infrared survey report · ${data.organisation} · ${data.survey.plannedFor}`, Author: data.organisation, Creator: 'Greybody' },
      lang: 'en-GB', displayTitle: true, pdfVersion: '1.7',
    } as PDFKit.PDFDocumentOptions)
    for (const script of ['latin', 'latinExt', 'greek'] as Script[]) {
      for (const face of ['regular', 'bold'] as Face[]) {
        this.doc.registerFont(fontName(script, face), woffToSfnt(fonts[script][face]))
        // Tabular figures for every run. Given as a text option, features turn off pdfkit's per-word layout cache and
        // each word is shaped again (most of the drawing time); set on the font instead, the cache keeps working.
        this.doc.font(fontName(script, face))
        const shaper = (this.doc as unknown as { _font: { font: { layout: (t: string, f?: unknown) => unknown } } })._font.font
        const layout = shaper.layout.bind(shaper)
        shaper.layout = (t: string, f?: unknown) => layout(t, f ?? TNUM)
      }
    }
    this.t = data.units.temperature
    this.l = data.units.length
    this.use('regular', 9.5)
  }

  use(face: Face, size = this.size) {
    this.face = face
    this.size = size
    this.doc.font(fontName('latin', face)).fontSize(size)
    return this
  }

  get left() { return MARGIN }
  get width() { return A4[0] - 2 * MARGIN }
  get bottom() { return A4[1] - MARGIN - 18 }

  /** Writes text in the current face, switching font subsets for Greek or extended Latin letters. */
  text(str: string, x?: number, y?: number, opts: PDFKit.Mixins.TextOptions = {}) {
    // Line by line: a line break inside a run of mixed fonts is not kept by pdfkit's continued text.
    if (str.includes('\n')) {
      str.split('\n').forEach((line, i) => (i === 0 ? this.text(line, x, y, opts) : this.text(line, x, undefined, opts)))
      return this
    }
    const runs = scriptRuns(str)
    const o = opts
    if (runs.length <= 1) {
      this.doc.font(fontName(runs[0]?.script ?? 'latin', this.face))
      if (x === undefined) this.doc.text(runs[0]?.text ?? '', o)
      else this.doc.text(runs[0]?.text ?? '', x, y ?? this.doc.y, o)
      this.doc.font(fontName('latin', this.face))
      return this
    }
    runs.forEach((r, i) => {
      this.doc.font(fontName(r.script, this.face))
      const last = i === runs.length - 1
      if (i === 0 && x !== undefined) this.doc.text(r.text, x, y ?? this.doc.y, { ...o, continued: !last })
      else this.doc.text(r.text, { ...o, continued: !last })
    })
    this.doc.font(fontName('latin', this.face))
    return this
  }

  heightOf(str: string, width: number) {
    return this.doc.heightOfString([...str].map((c) => FALLBACK[c] ?? c).join(''), { width })
  }

  ensure(height: number) {
    if (this.doc.y + height > this.bottom) this.doc.addPage()
  }

  heading(str: string, level: 1 | 2 | 3 = 1) {
    const size = level === 1 ? 16 : level === 2 ? 12 : 10.5
    this.ensure(size * 3)
    if (level === 1) this.doc.moveDown(0.4)
    this.use('bold', size)
    this.doc.fillColor(INK)
    this.text(str, this.left, this.doc.y, { width: this.width })
    if (level === 1) {
      const y = this.doc.y + 2
      this.doc.moveTo(this.left, y).lineTo(this.left + this.width, y).lineWidth(1.2).strokeColor(GRAPHITE).stroke()
      this.doc.y = y + 8
    } else this.doc.moveDown(0.25)
    this.use('regular', 9.5)
  }

  paragraph(str: string, opts: { colour?: string; size?: number; face?: Face } = {}) {
    this.use(opts.face ?? 'regular', opts.size ?? 9.5)
    this.ensure(this.heightOf(str, this.width) + 4)
    this.doc.fillColor(opts.colour ?? INK)
    this.text(str, this.left, this.doc.y, { width: this.width })
    this.doc.moveDown(0.35)
    this.use('regular', 9.5)
  }

  /** A two-column list of label and value pairs. */
  facts(rows: Array<[string, string]>, labelWidth = 150) {
    const valueWidth = this.width - labelWidth
    for (const [label, value] of rows) {
      this.use('regular', 9.5)
      const h = Math.max(this.heightOf(label, labelWidth - 8), this.heightOf(value || '—', valueWidth)) + 3
      this.ensure(h)
      const y = this.doc.y
      this.doc.fillColor(MUTED)
      this.text(label, this.left, y, { width: labelWidth - 8 })
      this.use('bold')
      this.doc.fillColor(INK)
      this.text(value || '—', this.left + labelWidth, y, { width: valueWidth })
      this.doc.y = y + h
    }
    this.use('regular', 9.5)
    this.doc.moveDown(0.3)
  }

  /** A table with a repeated header row; `fills` colours a cell's background (band chips in the summary). */
  table(columns: Array<{ title: string; width: number; align?: 'left' | 'right' }>, rows: string[][], fills?: Array<Array<CellFill | null>>) {
    const total = columns.reduce((s, c) => s + c.width, 0)
    const scale = this.width / total
    const cols = columns.map((c) => ({ ...c, width: c.width * scale }))
    const pad = 3
    const size = 8.5
    const header = () => {
      this.use('bold', size)
      const h = Math.max(...cols.map((c) => this.heightOf(c.title, c.width - 2 * pad))) + 2 * pad
      this.ensure(h + 14)
      const y = this.doc.y
      this.doc.rect(this.left, y, this.width, h).fill(GRAPHITE)
      let x = this.left
      for (const c of cols) {
        this.doc.fillColor('#ffffff')
        this.text(c.title, x + pad, y + pad, { width: c.width - 2 * pad, align: c.align ?? 'left' })
        x += c.width
      }
      this.doc.y = y + h
    }
    header()
    rows.forEach((row, ri) => {
      this.use('regular', size)
      const h = Math.max(...cols.map((c, i) => this.heightOf(row[i] || '—', c.width - 2 * pad))) + 2 * pad
      if (this.doc.y + h > this.bottom) {
        this.doc.addPage()
        header()
        this.use('regular', size)
      }
      const y = this.doc.y
      if (ri % 2 === 1) this.doc.rect(this.left, y, this.width, h).fill(PANEL)
      let x = this.left
      cols.forEach((c, i) => {
        const fill = fills?.[ri]?.[i]
        if (fill) this.doc.rect(x + 1, y + 1, c.width - 2, h - 2).fill(fill.bg)
        this.doc.fillColor(fill ? fill.ink : INK)
        this.text(row[i] || '—', x + pad, y + pad, { width: c.width - 2 * pad, align: c.align ?? 'left' })
        x += c.width
      })
      this.doc.moveTo(this.left, y + h).lineTo(this.left + this.width, y + h).lineWidth(0.4).strokeColor(RULE).stroke()
      this.doc.y = y + h
    })
    this.use('regular', 9.5)
    this.doc.moveDown(0.6)
  }

  bandChip(band: number | null, x: number, y: number, label: string) {
    this.use('bold', 10)
    const w = this.doc.widthOfString(label) + 16
    this.doc.roundedRect(x, y, w, 18, 9).fill(band ? BAND_FILL[band]! : SLATE)
    this.doc.fillColor(band ? BAND_INK[band]! : '#ffffff')
    this.text(label, x + 8, y + 4.5, { lineBreak: false })
    this.use('regular', 9.5)
    return w
  }

  // Formatting in the requester's units: temperatures, differences (K or °F), lengths.
  temp(c: number | null) { return c === null ? '—' : formatTemperature(c + 273.15, this.t) }
  delta(k: number | null) { return k === null ? '—' : formatDelta(k, this.t) }
  len(m: number | null) { return m === null ? '—' : formatLength(m, this.l) }
  chainValue(v: ChainValue): string {
    if (v.value === null || v.value === undefined) return '—'
    if (typeof v.value === 'string') return v.value
    const iv = (f: (n: number) => string) => (v.interval ? `${f(v.value as number)}  (${f(v.interval.low)} to ${f(v.interval.high)})` : f(v.value as number))
    switch (v.kind) {
      case 'temperature': return iv((k) => formatTemperature(k, this.t))
      case 'difference': return iv((k) => formatDelta(k, this.t))
      case 'factor': return `× ${formatNumber(v.value, 3)}`
      case 'percent': return `${formatNumber(v.value, 0)} %`
      case 'speed': return `${formatNumber(v.value, 1)} m/s`
      case 'days': return `${formatNumber(v.value, 0)} day${v.value === 1 ? '' : 's'}`
      default: return String(v.value)
    }
  }
}

function bandLabel(band: number | null): string {
  return band === null ? 'Below the bands' : `Band ${band}`
}

function effectiveBand(f: ReportFinding): number | null {
  return f.reviewedBand ?? f.band
}

function cover(r: Report) {
  const { doc, data } = r
  doc.rect(0, 0, A4[0], 210).fill(GRAPHITE)
  // Four band stops as a thin strip: the report's only decoration, and a key to the colours used inside.
  const stripW = A4[0] / 4
  ;[1, 2, 3, 4].forEach((b, i) => doc.rect(i * stripW, 210, stripW, 6).fill(BAND_FILL[b]!))
  r.use('regular', 10)
  doc.fillColor('#d6d3d1')
  r.text(data.organisation, MARGIN, 56, { width: r.width })
  r.use('bold', 26)
  doc.fillColor('#ffffff')
  r.text('Infrared survey report', MARGIN, 76, { width: r.width })
  r.use('regular', 12)
  doc.fillColor('#e7e5e4')
  const sites = data.sites.map((s) => s.name).join(', ')
  r.text(`${data.survey.plannedFor}${data.survey.routeName ? ` · ${data.survey.routeName}` : ''}`, MARGIN, 116, { width: r.width })
  r.use('regular', 10)
  r.text(sites, MARGIN, 136, { width: r.width, height: 60, ellipsis: true })
  doc.y = 240
  r.use('regular', 9.5)
  r.heading('Survey', 2)
  r.facts([
    ['Organisation', data.organisation],
    ['Sites', data.sites.map((s) => `${s.code} ${s.name}`).join('; ')],
    ['Survey date', data.survey.plannedFor],
    ['Started', data.survey.startedAt ?? '—'],
    ['Submitted for review', data.survey.submittedAt ?? '—'],
    ['Reviewed', data.survey.reviewedAt ? `${data.survey.reviewedAt}${data.survey.reviewedBy ? ` by ${data.survey.reviewedBy}` : ''}` : '—'],
  ])
  r.heading('Thermographer and instrument', 2)
  r.facts([
    ['Thermographer', data.thermographer.name],
    ['Qualification', data.thermographer.qualification || 'Not recorded'],
    ['Instrument', data.instrument.label],
    ['Spectral band', data.instrument.band],
    ['Accuracy', data.instrument.accuracy],
    ['IFOV', data.instrument.ifovMrad === null ? '—' : `${formatNumber(data.instrument.ifovMrad, 2)} mrad`],
    ['Calibration due', data.instrument.calibrationDue
      ? `${data.instrument.calibrationDue}${data.instrument.calibrationOverdue ? ' (past due on the survey date)' : ''}`
      : 'Not recorded'],
  ])
  r.heading('At a glance', 2)
  const c = data.counts
  const byBand = [1, 2, 3, 4].map((b) => data.findings.filter((f) => effectiveBand(f) === b).length)
  r.facts([
    ['Assets in scope', String(c.assets)],
    ['Looked at', `${c.clear + c.finding} (${c.clear} clear, ${c.finding} with findings)`],
    ['Not reached', String(c.notReached)],
    ['Findings', `${data.findings.length}: ${byBand.map((n, i) => `band ${i + 1}: ${n}`).join(', ')}`],
    ['Report', `${data.reportId.slice(0, 8)} · made ${data.generatedAt} for ${data.generatedBy}`],
  ])
  r.paragraph(SAFETY_CAUTION[SAFETY_CAUTION.length - 1]!, { colour: MUTED, size: 8.5 })
}

function scope(r: Report) {
  const { data } = r
  r.doc.addPage()
  r.heading('Scope and conditions')
  r.paragraph(
    `The survey covered ${data.counts.assets} asset${data.counts.assets === 1 ? '' : 's'} at ${data.sites.length} site${data.sites.length === 1 ? '' : 's'}. ` +
      `Findings are ranked against ${data.criteria.join('; ') || 'the organisation’s criteria set'}. Temperatures are shown in ${temperatureSymbol(r.t)}, ` +
      `temperature rises in ${deltaSymbol(r.t)}, distances in ${r.l === 'm' ? 'metres' : 'feet'} and wind in m/s.`,
  )
  if (data.survey.reviewComments) r.facts([['Review comments', data.survey.reviewComments]])
  r.heading('Field conditions by site', 2)
  r.table(
    [{ title: 'Site', width: 150 }, { title: `Ambient (${temperatureSymbol(r.t)})`, width: 62, align: 'right' }, { title: 'Wind (m/s)', width: 55, align: 'right' },
      { title: 'Humidity (%)', width: 60, align: 'right' }, { title: 'Sky', width: 70 }, { title: 'Load notes', width: 150 }],
    data.sites.map((s) => [
      `${s.code} ${s.name}`,
      s.conditions.ambientC === null ? '—' : formatNumber(r.t === 'C' ? s.conditions.ambientC : (s.conditions.ambientC * 9) / 5 + 32, 1),
      s.conditions.windMs === null ? '—' : formatNumber(s.conditions.windMs, 1),
      s.conditions.humidityPct === null ? '—' : formatNumber(s.conditions.humidityPct, 0),
      s.conditions.sky ? s.conditions.sky.replace('_', ' ') : '—',
      s.conditions.loadNotes || '—',
    ]),
  )
}

function summary(r: Report) {
  const { data } = r
  r.heading('Summary of findings')
  if (!data.findings.length) {
    r.paragraph('No findings were recorded on this survey.')
    return
  }
  const d = deltaSymbol(r.t)
  const fills: Array<Array<CellFill | null>> = []
  const rows = data.findings.map((f) => {
    const b = effectiveBand(f)
    fills.push([null, null, null, null, null, bandFill(b), null, null])
    return [
      String(f.number),
      f.site,
      `${f.assetLabel} · ${f.component}${f.phase ? ` (${f.phase})` : ''}`,
      f.riseOverReferenceK === null ? '—' : formatNumber(r.t === 'C' ? f.riseOverReferenceK : (f.riseOverReferenceK * 9) / 5, 1),
      f.riseOverAmbientK === null ? '—' : formatNumber(r.t === 'C' ? f.riseOverAmbientK : (f.riseOverAmbientK * 9) / 5, 1),
      b === null ? '—' : `${b}${f.reviewedBand !== null ? '*' : ''}`,
      f.repairBy ?? 'Record and trend',
      f.workOrder === undefined ? 'n/a' : f.workOrder === null ? 'None yet' : `#${f.workOrder.number} ${f.workOrder.stateLabel}`,
    ]
  })
  r.table(
    [{ title: 'No.', width: 26, align: 'right' }, { title: 'Site', width: 90 }, { title: 'Asset · component', width: 140 },
      { title: `Over ref. (${d})`, width: 50, align: 'right' }, { title: `Over amb. (${d})`, width: 50, align: 'right' },
      { title: 'Band', width: 34 }, { title: 'Repair by', width: 62 }, { title: 'Work order', width: 80 }],
    rows,
    fills,
  )
  if (data.findings.some((f) => f.reviewedBand !== null)) r.paragraph('* Band set on review; the reason is given in the finding’s section.', { colour: MUTED, size: 8.5 })
}

function inventory(r: Report) {
  const { data } = r
  r.doc.addPage()
  r.heading('Inventory of assets')
  r.paragraph('Every asset at the surveyed sites, with what was found. Assets not reached are listed with the reason, so the next survey can pick them up.', { colour: MUTED })
  const outcomeText = (a: ReportInventoryAsset) =>
    a.outcome === 'clear' ? 'Clear'
      : a.outcome === 'finding' ? `Finding${a.findingNumbers.length > 1 ? 's' : ''} ${a.findingNumbers.map((n) => `no. ${n}`).join(', ')}`
        : a.outcome === 'not_reached' ? `Not reached: ${a.reason ?? 'no reason given'}` : 'Not checked'
  for (const s of data.sites) {
    r.heading(`${s.code} ${s.name}`, 2)
    if (!s.assets.length) {
      r.paragraph('No assets registered at this site.', { colour: MUTED })
      continue
    }
    r.table(
      [{ title: 'Asset', width: 120 }, { title: 'Class', width: 100 }, { title: 'Outcome', width: 150 }, { title: 'Note', width: 130 }],
      s.assets.map((a) => [a.label, a.assetClass.replace(/_/g, ' '), outcomeText(a), a.note || '']),
    )
  }
}

async function findingSection(r: Report, f: ReportFinding, images: ReportImage[]) {
  const { doc } = r
  doc.addPage()
  const b = effectiveBand(f)
  r.use('regular', 9)
  doc.fillColor(MUTED)
  r.text(`Finding ${f.number} of ${r.data.findings.length} · ${f.site}`, r.left, MARGIN, { width: r.width })
  r.use('bold', 15)
  doc.fillColor(INK)
  r.text(`${f.assetLabel} · ${f.component}${f.phase ? ` (${f.phase})` : ''}`, r.left, doc.y + 2, { width: r.width - 110 })
  const below = doc.y
  r.bandChip(b, r.left + r.width - 100, MARGIN + 2, bandLabel(b))
  doc.y = below + 2
  r.use('regular', 9)
  doc.fillColor(MUTED)
  r.text(`${f.assetClass.replace(/_/g, ' ')} · ranked with ${f.criteria}`, r.left, doc.y, { width: r.width })
  doc.moveDown(0.5)

  // Images side by side: infrared on the left, visible light on the right.
  const gap = 12
  const w = (r.width - gap) / 2
  const h = w * 0.75
  const top = doc.y
  const slots: Array<['infrared' | 'visible', string]> = [['infrared', 'Infrared'], ['visible', 'Visible light']]
  slots.forEach(([kind, label], i) => {
    const x = r.left + i * (w + gap)
    const img = images.find((im) => im.kind === kind)
    doc.rect(x, top, w, h).fill(PANEL)
    if (img) {
      doc.image(Buffer.from(img.data), x, top, { fit: [w, h], align: 'center', valign: 'center' })
      r.images++
    } else {
      r.use('regular', 9)
      doc.fillColor(MUTED)
      const why = r.data.includeImages ? `No ${label.toLowerCase()} image attached` : 'Images left out of this copy'
      r.text(why, x, top + h / 2 - 5, { width: w, align: 'center' })
    }
    r.use('regular', 8)
    doc.fillColor(MUTED)
    r.text(img ? `${label} · ${img.fileName}` : label, x, top + h + 3, { width: w, lineBreak: false, ellipsis: true })
  })
  doc.y = top + h + 18
  if (f.imageCount > images.length && r.data.includeImages) r.paragraph(`${f.imageCount - images.length} more image(s) on record in Greybody.`, { colour: MUTED, size: 8 })

  const i = f.inputs
  const half = (r.width - 16) / 2
  const readingRows: Array<[string, string]> = [
    ['Hot spot, apparent', r.temp(i.apparentC)],
    ['Reference, apparent', r.temp(i.referenceC)],
    ['Ambient air', r.temp(i.ambientC)],
    ['Emissivity ε', formatNumber(i.emissivity, 2)],
    ['Reflected temperature', `${r.temp(i.reflectedC)} (${i.reflectedMethod})`],
    ['Distance', r.len(i.distanceM)],
    ['Atmosphere τ', i.transmittance === null ? '—' : formatNumber(i.transmittance, 2)],
    ['IR window', i.windowTransmittance === null ? 'None' : `τ ${formatNumber(i.windowTransmittance, 2)} at ${r.temp(i.windowC)}`],
    ['Load / rated', i.loadA === null || i.ratedA === null ? 'Not recorded' : `${formatNumber(i.loadA, 0)} A of ${formatNumber(i.ratedA, 0)} A (${formatNumber((100 * i.loadA) / i.ratedA, 0)} %)`],
    ['Wind', i.windMs === null ? 'Not recorded' : `${formatNumber(i.windMs, 1)} m/s`],
  ]
  const resultRows: Array<[string, string]> = [
    ['Hot spot, corrected', f.intervalC ? `${r.temp(f.objectC)} (${r.temp(f.intervalC.low)} to ${r.temp(f.intervalC.high)})` : r.temp(f.objectC)],
    ['Rise over reference', r.delta(f.riseOverReferenceK)],
    ['Rise over ambient', r.delta(f.riseOverAmbientK)],
    ['Rise at full load', r.delta(f.loadScaledRiseK)],
    ['Band (computed)', `${bandLabel(f.band)}${f.bandBasis ? `, from the rise ${f.bandBasis === 'overReference' ? 'over reference' : f.bandBasis === 'overAmbient' ? 'over ambient' : 'as absolute temperature'}` : ''}`],
    ...(f.reviewedBand !== null ? [['Band (on review)', `${bandLabel(f.reviewedBand)}: ${f.reviewReason ?? ''}`] as [string, string]] : []),
    ['Repair deadline', f.repairDeadlineDays === null ? 'None: record and trend' : `${f.repairDeadlineDays} day${f.repairDeadlineDays === 1 ? '' : 's'} (by ${f.repairBy})`],
    ['Work order', f.workOrder === undefined ? 'Not available' : f.workOrder === null ? 'None raised yet'
      : `#${f.workOrder.number}, ${f.workOrder.stateLabel}${f.workOrder.dueOn ? `, due ${f.workOrder.dueOn}` : ''}`],
  ]
  const colTop = doc.y
  r.heading('Reading', 3)
  // Two columns: the reading as taken, and what came of it.
  const drawFacts = (rows: Array<[string, string]>, x: number, y: number, width: number) => {
    doc.y = y
    for (const [label, value] of rows) {
      r.use('regular', 8.5)
      const lh = Math.max(r.heightOf(label, width * 0.45), r.heightOf(value, width * 0.55 - 4)) + 2
      const yy = doc.y
      doc.fillColor(MUTED)
      r.text(label, x, yy, { width: width * 0.45 })
      r.use('bold', 8.5)
      doc.fillColor(INK)
      r.text(value, x + width * 0.45 + 4, yy, { width: width * 0.55 - 4 })
      doc.y = yy + lh
    }
    return doc.y
  }
  const yAfterHeading = doc.y
  const leftEnd = drawFacts(readingRows, r.left, yAfterHeading, half)
  r.use('bold', 10.5)
  doc.fillColor(INK)
  r.text('Result', r.left + half + 16, colTop, { width: half })
  const rightEnd = drawFacts(resultRows, r.left + half + 16, yAfterHeading, half)
  doc.y = Math.max(leftEnd, rightEnd) + 8

  r.heading('Recommended action', 3)
  r.paragraph(f.action || 'No action: below the lowest band.')
  r.paragraph(`Probable cause: ${f.probableCause}${f.causeNotes ? `. ${f.causeNotes}` : ''}`, { colour: GRAPHITE })
  if (f.notes) r.paragraph(`Notes: ${f.notes}`, { colour: GRAPHITE })
  if (f.warnings.length) {
    r.heading('Validity warnings', 3)
    for (const w of f.warnings) r.paragraph(`${w.severity === 'critical' ? 'Important: ' : ''}${w.message}`, { size: 8.5, colour: GRAPHITE })
  }
  if (f.chain) {
    r.heading('Correction chain', 3)
    const rows: string[][] = []
    f.chain.forEach((step, si) => {
      const values = step.values.filter((v) => v.key !== 'action')
      rows.push([`${si + 1}. ${step.title}`, step.note, values.map((v) => `${v.label}: ${r.chainValue(v)}`).join('\n') || '—'])
    })
    r.table([{ title: 'Step', width: 110 }, { title: 'How', width: 200 }, { title: 'Values', width: 190 }], rows)
  }
  r.paragraph('Bands are guidance, not an instruction to approach, open, switch or operate equipment.', { colour: MUTED, size: 8 })
}

function closing(r: Report) {
  r.doc.addPage()
  r.heading('Safety caution')
  for (const point of SAFETY_CAUTION) r.paragraph(`•  ${point}`)
  r.heading('About this report')
  r.paragraph(REPORT_DISCLAIMER)
  r.paragraph(
    'Figures were computed by Greybody from the readings as recorded: band-limited radiometry over the instrument’s spectral band, rises over a ' +
      'similar component and over ambient air, scaled to full load where the load was recorded, and ranked against the criteria set named with ' +
      'each finding. Diagnosis of causes may need skills beyond thermography.',
    { colour: GRAPHITE },
  )
}

// The footer is drawn as each page starts, so pages are written out as they are finished (no buffering of a
// 200-page document, and no second pass over it): the page number is given without the total.
function footer(r: Report, page: number) {
  const { doc, data } = r
  const { x, y: top } = { x: doc.x, y: doc.y }
  const bottomMargin = doc.page.margins.bottom
  const face = r.face
  const size = r.size
  doc.page.margins.bottom = 0
  r.use('regular', 7.5)
  doc.fillColor(MUTED)
  const y = A4[1] - MARGIN + 8
  doc.moveTo(MARGIN, y - 4).lineTo(A4[0] - MARGIN, y - 4).lineWidth(0.4).strokeColor(RULE).stroke()
  r.text(`${data.organisation} · survey of ${data.survey.plannedFor} · infrared survey report`, MARGIN, y, { width: r.width * 0.75, lineBreak: false, ellipsis: true })
  r.text(`Page ${page}`, MARGIN + r.width * 0.75, y, { width: r.width * 0.25, align: 'right', lineBreak: false })
  doc.page.margins.bottom = bottomMargin
  r.use(face, size)
  doc.fillColor(INK)
  doc.x = x
  doc.y = top
}

/**
 * Draws the report. `imagesOf(i)` gives finding i's images (the caller fetches ahead); `onProgress` is told the
 * share done (0..1) after each finding.
 */
export async function renderSurveyReport(
  data: ReportData,
  fonts: ReportFonts,
  imagesOf: (index: number) => Promise<ReportImage[]>,
  onProgress: (done: number) => Promise<void> | void = () => {},
): Promise<RenderResult> {
  const r = new Report(data, fonts)
  let pages = 1
  footer(r, pages)
  r.doc.on('pageAdded', () => footer(r, ++pages))
  const chunks: Buffer[] = []
  r.doc.on('data', (c: Buffer) => chunks.push(c))
  const ended = new Promise<void>((resolve, reject) => {
    r.doc.on('end', () => resolve())
    r.doc.on('error', reject)
  })
  cover(r)
  scope(r)
  summary(r)
  inventory(r)
  for (let i = 0; i < data.findings.length; i++) {
    const images = data.includeImages ? await imagesOf(i) : []
    await findingSection(r, data.findings[i]!, images)
    await onProgress((i + 1) / Math.max(1, data.findings.length))
  }
  closing(r)
  r.doc.end()
  await ended
  return { pdf: Buffer.concat(chunks), pages, images: r.images }
}
