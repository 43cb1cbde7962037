/** A surface in the emissivity library, with where the value comes from. */
export interface Surface {
  id: string
  name: string
  /** The value offered when the surface is picked (midpoint of a range unless the source gives one value). */
  emissivity: number
  /** The published range, when the source gives one. */
  range?: readonly [number, number]
  source: string
  provenance: 'published' | 'from memory' | 'common practice'
}

// Total emissivity near room temperature, reference sheet §4. Metals vary with surface condition:
// measure per ASTM E1933 where it matters.
/** Seed surface library (reference sheet §4). */
export const SURFACES: readonly Surface[] = [
  { id: 'al-polished', name: 'Aluminium, polished', emissivity: 0.05, range: [0.04, 0.06], source: 'Ede, An Introduction to Heat Transfer (1967)', provenance: 'published' },
  { id: 'al-sheet', name: 'Aluminium, commercial sheet', emissivity: 0.09, source: 'Hottel-derived compiled table', provenance: 'published' },
  { id: 'al-oxidised', name: 'Aluminium, oxidised', emissivity: 0.15, range: [0.1, 0.2], source: 'Ede (1967)', provenance: 'published' },
  { id: 'al-heavily-oxidised', name: 'Aluminium, heavily oxidised', emissivity: 0.25, range: [0.2, 0.31], source: 'Hottel-derived compiled table', provenance: 'published' },
  { id: 'al-anodised', name: 'Aluminium, anodised', emissivity: 0.83, range: [0.82, 0.84], source: 'Hottel-derived compiled table', provenance: 'published' },
  { id: 'cu-polished', name: 'Copper, polished', emissivity: 0.03, range: [0.02, 0.05], source: 'Ede (1967); Liley, Heat Exchanger Design Handbook §5.5.7', provenance: 'published' },
  { id: 'cu-oxidised', name: 'Copper, oxidised or tarnished', emissivity: 0.65, range: [0.6, 0.7], source: 'Ede (1967); Liley gives 0.50–0.80', provenance: 'published' },
  { id: 'cast-iron-bright', name: 'Cast iron, bright', emissivity: 0.22, range: [0.2, 0.25], source: 'Ede (1967)', provenance: 'published' },
  { id: 'cast-iron-oxidised', name: 'Cast iron, oxidised', emissivity: 0.65, range: [0.6, 0.7], source: 'Ede (1967)', provenance: 'published' },
  { id: 'steel-oxidised', name: 'Steel plate, oxidised', emissivity: 0.7, range: [0.6, 0.8], source: 'Ede (1967)', provenance: 'published' },
  { id: 'steel-rough', name: 'Steel plate, rough', emissivity: 0.9, range: [0.85, 0.95], source: 'Ede (1967)', provenance: 'published' },
  { id: 'galvanised-new', name: 'Galvanised steel, new bright', emissivity: 0.23, source: "Hottel table in Perry's Handbook", provenance: 'from memory' },
  { id: 'galvanised-grey', name: 'Galvanised steel, grey oxidised', emissivity: 0.28, source: "Hottel table in Perry's Handbook", provenance: 'from memory' },
  { id: 'paint-nonmetallic', name: 'Non-metallic paint (any colour)', emissivity: 0.9, range: [0.8, 0.95], source: 'Ede (1967)', provenance: 'published' },
  { id: 'paint-aluminium', name: 'Aluminium paint', emissivity: 0.5, range: [0.3, 0.7], source: 'Ede (1967)', provenance: 'published' },
  { id: 'lacquer', name: 'Lacquer', emissivity: 0.9, range: [0.8, 0.95], source: 'Heat-transfer course table', provenance: 'published' },
  { id: 'glass', name: 'Glass', emissivity: 0.92, range: [0.9, 0.95], source: 'Ede (1967)', provenance: 'published' },
  { id: 'porcelain-glazed', name: 'Porcelain, glazed', emissivity: 0.92, source: 'Hottel table', provenance: 'from memory' },
  { id: 'rubber-hard', name: 'Rubber, hard glossy', emissivity: 0.94, source: 'Hottel table', provenance: 'from memory' },
  { id: 'rubber-soft', name: 'Rubber, soft grey', emissivity: 0.86, source: 'Hottel table', provenance: 'from memory' },
  { id: 'plastic-pvc', name: 'Plastic or PVC insulation', emissivity: 0.9, range: [0.85, 0.95], source: 'Common practice', provenance: 'common practice' },
  { id: 'vinyl-tape', name: 'Black vinyl electrical tape (LWIR)', emissivity: 0.95, source: 'Common practice; the usual ASTM E1933 reference emitter', provenance: 'common practice' },
  { id: 'brick', name: 'Brick', emissivity: 0.93, source: "Holman, via Kutz, Mechanical Engineers' Handbook", provenance: 'published' },
  { id: 'concrete', name: 'Concrete', emissivity: 0.91, range: [0.88, 0.94], source: 'Reference sheet §4', provenance: 'from memory' },
]

/** A surface by id, if known. */
export function surfaceById(id: string | undefined): Surface | undefined {
  return SURFACES.find((s) => s.id === id)
}
