// How a version's peaks are kept in submissions.peaks: column by column, as binary numbers.
// A 5,000-row table written as JSON objects was about 370 kB that PostgreSQL parsed into jsonb
// on every upload (most of the storing transaction); as columns of float64 it is 160 kB that
// goes over the wire and into the row as it is. Pure functions: the engine worker packs, the
// pages that show peaks unpack.
//
// Layout (little-endian: typed arrays use the machine's order, and Node's platforms are all
// little-endian), format 1:
//   u8 format, u8 columns present (1 area %, 2 height, 4 row), u16 label count,
//   u32 peak count n, u32 byte length of the labels (UTF-8 JSON array of strings),
//   the labels, zero padding to a multiple of 8, then float64 columns of n values each:
//   retention time, area, [area %], [height], [row], then u16 labels (0 = unassigned,
//   k = the k-th label). NaN in an optional column means that peak has no such value.
// An empty value (no bytes) is a version with no peaks.

export interface StoredPeak {
  retentionTime: number
  area: number
  areaPercent?: number
  height?: number
  row?: number
  /** Product SMILES, 'solvent', 'starting-material', or null (unassigned). */
  assignedTo: string | null
}

const FORMAT = 1
const OPTIONAL = [['areaPercent', 1], ['height', 2], ['row', 4]] as const
const HEADER_BYTES = 12

/** The peaks as stored bytes. */
export function packPeaks(peaks: readonly StoredPeak[]): Uint8Array {
  const n = peaks.length
  if (n === 0) return new Uint8Array(0)
  // One pass with the fields named: a look-up by a key held in a variable cost as much as the packing.
  let mask = 0
  for (let i = 0; i < n; i++) {
    const p = peaks[i]!
    if (p.areaPercent !== undefined) mask |= 1
    if (p.height !== undefined) mask |= 2
    if (p.row !== undefined) mask |= 4
  }
  const labels: string[] = []
  const labelIndex = new Map<string, number>()
  const codes = new Uint16Array(n)
  for (let i = 0; i < n; i++) {
    const label = peaks[i]!.assignedTo
    if (label === null || label === undefined) continue
    let k = labelIndex.get(label)
    if (k === undefined) {
      labels.push(label)
      k = labels.length
      labelIndex.set(label, k)
    }
    codes[i] = k
  }
  if (labels.length > 0xffff) throw new Error('packPeaks: too many distinct labels')
  const labelBytes = new TextEncoder().encode(JSON.stringify(labels))
  const columnsAt = Math.ceil((HEADER_BYTES + labelBytes.length) / 8) * 8
  const optional = OPTIONAL.filter(([, bit]) => mask & bit)
  const columns = 2 + optional.length
  const bytes = new Uint8Array(columnsAt + columns * 8 * n + 2 * n)
  const view = new DataView(bytes.buffer)
  view.setUint8(0, FORMAT)
  view.setUint8(1, mask)
  view.setUint16(2, labels.length, true)
  view.setUint32(4, n, true)
  view.setUint32(8, labelBytes.length, true)
  bytes.set(labelBytes, HEADER_BYTES)
  const numbers = new Float64Array(bytes.buffer, columnsAt, columns * n)
  for (let i = 0; i < n; i++) {
    const p = peaks[i]!
    numbers[i] = p.retentionTime
    numbers[n + i] = p.area
  }
  optional.forEach(([key], c) => {
    const at = (2 + c) * n
    for (let i = 0; i < n; i++) numbers[at + i] = peaks[i]![key] ?? Number.NaN
  })
  new Uint16Array(bytes.buffer, columnsAt + columns * 8 * n, n).set(codes)
  return bytes
}

/** The stored bytes as peaks, fields in the order the engines write them. */
export function unpackPeaks(stored: Uint8Array | null | undefined): StoredPeak[] {
  if (!stored || stored.length === 0) return []
  // Typed arrays need aligned offsets: a value read from the database may sit anywhere in a larger buffer.
  const bytes = stored.byteOffset % 8 === 0 ? stored : stored.slice()
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  const format = view.getUint8(0)
  if (format !== FORMAT) throw new Error(`unpackPeaks: unknown format ${format}`)
  const mask = view.getUint8(1)
  const n = view.getUint32(4, true)
  const labelLength = view.getUint32(8, true)
  const labels = JSON.parse(new TextDecoder().decode(bytes.subarray(HEADER_BYTES, HEADER_BYTES + labelLength))) as string[]
  const columnsAt = Math.ceil((HEADER_BYTES + labelLength) / 8) * 8
  const optional = OPTIONAL.filter(([, bit]) => mask & bit)
  const columns = 2 + optional.length
  const numbers = new Float64Array(bytes.buffer, bytes.byteOffset + columnsAt, columns * n)
  const codes = new Uint16Array(bytes.buffer, bytes.byteOffset + columnsAt + columns * 8 * n, n)
  const peaks: StoredPeak[] = new Array(n)
  for (let i = 0; i < n; i++) {
    const p = { retentionTime: numbers[i]!, area: numbers[n + i]! } as StoredPeak
    for (let c = 0; c < optional.length; c++) {
      const v = numbers[(2 + c) * n + i]!
      if (v === v) p[optional[c]![0]] = v
    }
    p.assignedTo = codes[i] ? labels[codes[i]! - 1]! : null
    peaks[i] = p
  }
  return peaks
}
