import { readFileSync } from 'node:fs'
import path from 'node:path'
import sharp from 'sharp'
import { PDFParse } from 'pdf-parse'
import { describe, expect, it } from 'vitest'
import { renderSurveyReport, scriptRuns, type ReportData, type ReportFinding, type ReportFonts, type ReportImage } from '../../../server/services/report-pdf'
import { REPORT_DISCLAIMER } from '../../../shared/report'

const FONT_DIR = path.join(__dirname, '../../../server/assets/fonts')
const font = (n: string) => new Uint8Array(readFileSync(path.join(FONT_DIR, n)))
const fonts: ReportFonts = {
  latin: { regular: font('manrope-latin-400-normal.woff'), bold: font('manrope-latin-700-normal.woff') },
  latinExt: { regular: font('manrope-latin-ext-400-normal.woff'), bold: font('manrope-latin-ext-700-normal.woff') },
  greek: { regular: font('manrope-greek-400-normal.woff'), bold: font('manrope-greek-700-normal.woff') },
}

function finding(n: number, over: Partial<ReportFinding> = {}): ReportFinding {
  return {
    number: n, id: `f-${n}`, site: 'LM-01 Lowmoor Grid', assetLabel: `BRK-${n}`, assetClass: 'Breaker', component: `Line clamp ${n}`, phase: 'B',
    inputs: { apparentC: 60 + n, referenceC: 30, ambientC: 15, emissivity: 0.9, reflectedC: 20, reflectedMethod: 'reflector', distanceM: 4, transmittance: null,
      windowTransmittance: null, windowC: null, loadA: 300, ratedA: 600, windMs: 1.5 },
    chain: [{ id: 'corrected', title: 'Emissivity, reflection and path corrected', note: 'Planck’s law with ε 0.9, τ 0.98', values: [
      { key: 'hotObject', label: 'Hot spot, corrected', kind: 'temperature', value: 340.15, interval: { low: 338, high: 342 } },
      { key: 'sigmaShortcut', label: 'σT⁴ shortcut (comparison only)', kind: 'temperature', value: 341 }] }],
    objectC: 67 + n, intervalC: { low: 65, high: 69 }, riseOverReferenceK: 20 + n, riseOverAmbientK: 50 + n, loadScaledRiseK: 80 + n,
    band: 2, bandBasis: 'overReference', reviewedBand: null, reviewReason: null, action: 'Plan the repair now.', repairDeadlineDays: 30, repairBy: '2027-01-01',
    probableCause: 'Loose or under-torqued connection', causeNotes: '', notes: '', warnings: [{ severity: 'caution', message: 'Load below 40 % of rated.' }],
    criteria: 'ANSI/NETA Table 100.18 (version 1)', workOrder: { number: 7, state: 'planned', stateLabel: 'planned', dueOn: '2027-01-01' }, imageCount: 2,
    ...over,
  }
}

function data(findings: ReportFinding[], includeImages = true): ReportData {
  return {
    reportId: '12345678-aaaa-4bbb-8ccc-000000000000', organisation: 'Lowmoor Valley Power',
    survey: { id: 's', plannedFor: '2026-12-01', startedAt: '2026-12-01 08:00 UTC', submittedAt: '2026-12-01 15:00 UTC', reviewedAt: '2026-12-02', reviewedBy: 'Mara Hale', reviewComments: '', routeName: 'North loop' },
    thermographer: { name: 'Tomasz Łęcki', qualification: 'ISO 18436-7 category II' },
    instrument: { label: 'Halden T8, serial H-1', band: '7.5–14 µm', accuracy: '±2 K', ifovMrad: 1.3, calibrationDue: '2027-03-31', calibrationOverdue: false },
    criteria: ['ANSI/NETA Table 100.18 (version 1)'],
    sites: [{ code: 'LM-01', name: 'Lowmoor Grid', safetyNotes: '', conditions: { ambientC: 15, windMs: 1.5, humidityPct: 60, sky: 'overcast', loadNotes: 'Peak' },
      assets: [
        ...findings.map((f) => ({ label: f.assetLabel, assetClass: 'Breaker', outcome: 'finding' as const, reason: null, note: '', findingNumbers: [f.number] })),
        { label: 'TX-9', assetClass: 'Transformer', outcome: 'not_reached' as const, reason: 'No access', note: 'Gate locked', findingNumbers: [] },
        { label: 'DS-3', assetClass: 'Disconnect', outcome: 'clear' as const, reason: null, note: '', findingNumbers: [] },
      ] }],
    findings, counts: { assets: findings.length + 2, clear: 1, finding: findings.length, notReached: 1, unchecked: 0 },
    generatedAt: '2026-12-02 08:00 UTC', generatedBy: 'Mara Hale', units: { temperature: 'C', length: 'm' }, includeImages,
  }
}

async function jpeg(colour: string): Promise<Uint8Array> {
  return new Uint8Array(await sharp({ create: { width: 640, height: 480, channels: 3, background: colour } }).jpeg().toBuffer())
}

async function textOf(pdf: Buffer): Promise<string> {
  const parser = new PDFParse({ data: new Uint8Array(pdf) })
  try {
    return (await parser.getText()).text
  } finally {
    await parser.destroy()
  }
}

const imageObjects = (pdf: Buffer) => (pdf.toString('latin1').match(/\/Subtype \/Image/g) ?? []).length

describe('survey report PDF', () => {
  it('splits text into the font subsets Manrope ships (Greek and extended Latin have their own files)', () => {
    expect(scriptRuns('ε 0.9, Łęcki').map((r) => r.script)).toEqual(['greek', 'latin', 'latinExt', 'latin'])
    expect(scriptRuns('σT⁴').map((r) => r.text).join('')).toBe('σT^4')
  })

  it('prints every finding, the inventory with reasons, the caution and the disclaimer, and embeds the images', { timeout: 30_000 }, async () => {
    const ir = await jpeg('#a52c60')
    const vis = await jpeg('#777777')
    const findings = [finding(1), finding(2, { reviewedBand: 1, reviewReason: 'Bolt visibly loose', workOrder: null }), finding(3, { band: null, workOrder: undefined })]
    const images = async (i: number): Promise<ReportImage[]> => (i === 2 ? [] : [{ kind: 'infrared', data: ir, fileName: 'ir.jpg' }, { kind: 'visible', data: vis, fileName: 'vis.jpg' }])
    const progress: number[] = []
    const out = await renderSurveyReport(data(findings), fonts, images, (p) => void progress.push(p))
    expect(out.images).toBe(4)
    expect(imageObjects(out.pdf)).toBe(4)
    expect(progress).toEqual([1 / 3, 2 / 3, 1])
    const text = (await textOf(out.pdf)).replace(/\s+/g, ' ')
    for (const f of findings) expect(text).toContain(`${f.assetLabel} · ${f.component} (B)`)
    expect(text).toContain('Band 1') // the reviewed band
    expect(text).toContain('Bolt visibly loose')
    expect(text).toContain('21.0 K') // rise over reference of finding 1, as given
    expect(text).toContain('Not reached: No access')
    expect(text).toContain('Gate locked')
    expect(text).toContain('Tomasz Łęcki')
    expect(text).toContain('ISO 18436-7 category II')
    expect(text).toContain('2027-03-31')
    expect(text).toContain('#7, planned')
    expect(text).toContain('None raised yet')
    expect(text).toContain(REPORT_DISCLAIMER.slice(0, 60))
    expect(text).toContain('No infrared image attached')
    expect(text).toMatch(/Page 1\b/)
  })

  it('leaves images out when asked, with a note in their place', async () => {
    const out = await renderSurveyReport(data([finding(1)], false), fonts, async () => { throw new Error('must not load images') })
    expect(out.images).toBe(0)
    expect(imageObjects(out.pdf)).toBe(0)
    expect(await textOf(out.pdf)).toContain('Images left out of this copy')
  })
})
