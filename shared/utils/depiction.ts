// Server-side structure drawing with the C–H positions lettered (a, b, c … in product order).
// openchemlib draws the molecule; its SVG is rebuilt from a whitelist of elements and
// attributes so the result is safe to inline: no script, no handlers, no external references.
import { analyzeSubstrate } from './halogenation'
import { parseSubstrateMolecule } from './lib/molecule'
import { SMILES_LIMITS } from './lib/smiles-size'

export interface PositionLabel {
  atoms: number[]
  label: string
}

export interface DepictOptions {
  /** true (default): letter every product's carbons; false: none; or explicit labels. */
  labels?: boolean | PositionLabel[]
  width?: number
  height?: number
  /** Accessible name; a description of the labelled positions is generated when absent. */
  title?: string
  /** Prefix for element ids, so several drawings can share a page. */
  idPrefix?: string
  /** A product is one atom larger than the largest substrate; default 'substrate'. */
  kind?: 'substrate' | 'product'
}

/** a … z, then aa, ab …: enough for any 40-atom substrate. */
export function positionLetter(index: number): string {
  let s = ''
  let i = index
  do {
    s = String.fromCharCode(97 + (i % 26)) + s
    i = Math.floor(i / 26) - 1
  } while (i >= 0)
  return s
}

const ALLOWED_ELEMENTS = new Set(['line', 'polygon', 'polyline', 'path', 'text', 'circle', 'ellipse', 'rect'])
const ALLOWED_ATTRIBUTES = new Set([
  'x', 'y', 'x1', 'y1', 'x2', 'y2', 'cx', 'cy', 'r', 'rx', 'ry', 'points', 'd', 'width', 'height',
  'fill', 'stroke', 'stroke-width', 'font-size', 'font-weight', 'text-anchor', 'opacity', 'fill-opacity', 'stroke-opacity',
])
const SAFE_VALUE = /^[#\w\s.,()%+-]*$/
// openchemlib's pale element colours fail contrast on white; darker shades of the same hues.
const COLOUR_FIX: Record<string, string> = {
  'rgb(31,240,31)': 'rgb(0,128,0)',
  'rgb(144,224,80)': 'rgb(46,125,50)',
  'rgb(166,41,41)': 'rgb(140,30,30)',
}

const escapeXml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;')

function rebuildElements(svg: string): string[] {
  const out: string[] = []
  const re = /<([a-z]+)\b([^>]*?)(\/>|>([^<]*)<\/\1>)/g
  let m: RegExpExecArray | null
  while ((m = re.exec(svg))) {
    const [, name, attrs, , content] = m
    if (!ALLOWED_ELEMENTS.has(name!) || /class="event"/.test(attrs!)) continue
    const kept: string[] = []
    for (const a of attrs!.matchAll(/([a-zA-Z][a-zA-Z0-9-]*)="([^"]*)"/g)) {
      const key = a[1]!
      const value = COLOUR_FIX[a[2]!] ?? a[2]!
      if (ALLOWED_ATTRIBUTES.has(key) && SAFE_VALUE.test(value) && !/url|script/i.test(value)) kept.push(`${key}="${value}"`)
    }
    if (name === 'text') kept.push('font-family="sans-serif"')
    out.push(content === undefined ? `<${name} ${kept.join(' ')}/>` : `<${name} ${kept.join(' ')}>${escapeXml(content)}</${name}>`)
  }
  return out
}

interface Point { x: number, y: number }

function segmentDistance(p: Point, a: Point, b: Point): number {
  const dx = b.x - a.x
  const dy = b.y - a.y
  const len2 = dx * dx + dy * dy
  const u = len2 === 0 ? 0 : Math.max(0, Math.min(1, ((p.x - a.x) * dx + (p.y - a.y) * dy) / len2))
  return Math.hypot(p.x - (a.x + u * dx), p.y - (a.y + u * dy))
}

/** Puts each tag where it is farthest from atoms, bonds and tags already placed. */
function placeTags(
  atomPos: Point[],
  bonds: [number, number][],
  labels: PositionLabel[],
  distance: number,
  texts: (Point & { size: number })[],
) {
  const placed: (Point & { label: string })[] = []
  for (const l of labels) {
    for (const atom of l.atoms) {
      const p = atomPos[atom]
      if (!p) continue
      // An atom drawn as text (a lone carbon as CH4, a halogen) needs room for its label.
      const own = texts.filter((t) => Math.hypot(t.x - p.x, t.y - p.y) < t.size)
      const d = Math.max(distance, ...own.map((t) => 1.1 * t.size))
      let best: Point = { x: p.x, y: p.y - d }
      let bestScore = -Infinity
      for (let k = 0; k < 24; k++) {
        // Start straight up-right so isolated atoms get a conventional spot.
        const angle = -Math.PI / 4 + (k * Math.PI) / 12
        const q = { x: p.x + d * Math.cos(angle), y: p.y + d * Math.sin(angle) }
        let score = Infinity
        for (const t of texts) score = Math.min(score, Math.hypot(q.x - t.x, q.y - t.y) - 0.3 * t.size)
        atomPos.forEach((a, i) => { if (i !== atom) score = Math.min(score, Math.hypot(q.x - a.x, q.y - a.y)) })
        for (const [i, j] of bonds) score = Math.min(score, 1.5 * segmentDistance(q, atomPos[i]!, atomPos[j]!))
        for (const t of placed) score = Math.min(score, 0.8 * Math.hypot(q.x - t.x, q.y - t.y))
        if (score > bestScore + 1e-9) { bestScore = score; best = q }
      }
      placed.push({ ...best, label: l.label })
    }
  }
  return placed
}

export function depictSubstrate(smiles: string, options: DepictOptions = {}): string {
  const mol = parseSubstrateMolecule(smiles, SMILES_LIMITS[options.kind ?? 'substrate'])
  const analysis = options.labels === undefined || options.labels === true ? analyzeSubstrate(smiles) : null
  const labels: PositionLabel[] = Array.isArray(options.labels)
    ? options.labels
    : analysis ? analysis.products.map((p, i) => ({ atoms: p.atoms, label: positionLetter(i) })) : []
  const width = options.width ?? 360
  const height = options.height ?? 260
  const prefix = (options.idPrefix ?? 'substrate').replace(/[^A-Za-z0-9_-]/g, '') || 'substrate'
  mol.inventCoordinates()
  const raw = mol.toSVG(width, height, prefix, {
    suppressChiralText: true,
    noStereoProblem: true,
    suppressCIPParity: true,
    suppressESR: true,
    maxAVBL: 40,
  })
  const atomPos: Point[] = []
  for (const m of raw.matchAll(/<circle id="[^"]*:Atom:(\d+)"[^>]*?cx="([-\d.]+)" cy="([-\d.]+)"/g)) {
    atomPos[Number(m[1])] = { x: Number(m[2]), y: Number(m[3]) }
  }
  const bonds: [number, number][] = []
  for (let b = 0; b < mol.getAllBonds(); b++) bonds.push([mol.getBondAtom(0, b), mol.getBondAtom(1, b)])
  const bondLength = bonds.length
    ? bonds.reduce((s, [i, j]) => s + Math.hypot(atomPos[i]!.x - atomPos[j]!.x, atomPos[i]!.y - atomPos[j]!.y), 0) / bonds.length
    : 40
  const radius = Math.max(6, Math.min(11, 0.26 * bondLength))
  const texts: (Point & { size: number })[] = []
  for (const m of raw.matchAll(/<text x="([-\d.]+)" y="([-\d.]+)"[^>]*?font-size="([\d.]+)"[^>]*>([^<]*)<\/text>/g)) {
    const size = Number(m[3])
    texts.push({ x: Number(m[1]) + 0.3 * size * m[4]!.length, y: Number(m[2]) - 0.35 * size, size })
  }
  const tags = placeTags(atomPos, bonds, labels, 0.62 * bondLength, texts)
  const xs = [...atomPos.map((p) => p.x), ...tags.map((t) => t.x)]
  const ys = [...atomPos.map((p) => p.y), ...tags.map((t) => t.y)]
  const pad = radius + 0.5 * bondLength
  const box = [
    Math.min(...xs) - pad,
    Math.min(...ys) - pad,
    Math.max(...xs) - Math.min(...xs) + 2 * pad,
    Math.max(...ys) - Math.min(...ys) + 2 * pad,
  ].map((v) => v.toFixed(2))
  const used = labels.filter((l) => l.atoms.length).map((l) => l.label)
  const letters = used.length ? `; the letters ${used.join(', ')} mark the carbons whose C–H substitution gives each product` : ''
  const title = options.title ?? `Structure of ${analysis?.formula ?? 'the substrate'}${letters}`
  const tagMarkup = tags.map((t) => {
    const x = t.x.toFixed(2)
    const y = t.y.toFixed(2)
    const circle = `<circle cx="${x}" cy="${y}" r="${radius.toFixed(2)}" fill="rgb(255,255,255)" stroke="rgb(30,64,175)" stroke-width="1.4"/>`
    const text = `<text x="${x}" y="${y}" text-anchor="middle" dominant-baseline="central" font-family="sans-serif"`
      + ` font-size="${(1.15 * radius).toFixed(1)}" font-weight="600" fill="rgb(30,64,175)">${escapeXml(t.label)}</text>`
    return `<g>${circle}${text}</g>`
  })
  const svg = [
    `<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="${width}" height="${height}" viewBox="${box.join(' ')}" role="img" aria-labelledby="${prefix}-title">`,
    `<title id="${prefix}-title">${escapeXml(title)}</title>`,
    `<g stroke-linecap="round" stroke-linejoin="round">`,
    ...rebuildElements(raw),
    '</g>',
    ...tagMarkup,
    '</svg>',
  ].join('\n')
  if (/<script|\son[a-z]+\s*=|href|url\(|javascript:|<foreignObject/i.test(svg)) throw new Error('Depiction failed its safety check.')
  return svg
}
