// A small writer of netCDF classic files (version byte 1), for test fixtures only. It follows
// Unidata's "NetCDF Classic Format Specification": magic "CDF\x01", numrecs, then the dimension,
// global attribute and variable lists (each a tag, a count and the entries), names and values
// padded to 4 bytes, all integers big-endian; then each variable's data at the offset ("begin")
// its header entry gives. No record (unlimited) dimension: every variable is fixed-size.

export type NcType = 'char' | 'short' | 'int' | 'float' | 'double'
export type NcValue = string | number[]

export interface NcVariable {
  name: string
  type: NcType
  /** Dimension names, outermost first; [] for a scalar. */
  dimensions: string[]
  attributes?: Record<string, NcValue | number>
  /** Numbers for numeric types; for char, the characters (padded with NUL to the shape). */
  data: number[] | string
}

export interface NcFile {
  dimensions: Record<string, number>
  attributes?: Record<string, NcValue | number>
  variables: NcVariable[]
}

const TYPE_CODE: Record<NcType, number> = { char: 2, short: 3, int: 4, float: 5, double: 6 }
const TYPE_SIZE: Record<NcType, number> = { char: 1, short: 2, int: 4, float: 4, double: 8 }
const TAG = { dimension: 10, variable: 11, attribute: 12 }

const pad4 = (n: number) => (4 - (n % 4)) % 4

class Bytes {
  private parts: number[] = []
  get length() { return this.parts.length }
  u32(v: number) { this.parts.push((v >>> 24) & 255, (v >>> 16) & 255, (v >>> 8) & 255, v & 255) }
  raw(bytes: ArrayLike<number>) { for (let i = 0; i < bytes.length; i++) this.parts.push(bytes[i]!) }
  pad() { for (let i = pad4(this.parts.length); i > 0; i--) this.parts.push(0) }
  name(text: string) {
    const b = new TextEncoder().encode(text)
    this.u32(b.length)
    this.raw(b)
    this.pad()
  }

  toArray() { return Uint8Array.from(this.parts) }
}

function encodeValues(type: NcType, values: number[] | string): Uint8Array {
  if (type === 'char') return new TextEncoder().encode(values as string)
  const nums = values as number[]
  const out = new DataView(new ArrayBuffer(nums.length * TYPE_SIZE[type]))
  nums.forEach((v, i) => {
    const at = i * TYPE_SIZE[type]
    if (type === 'short') out.setInt16(at, v)
    else if (type === 'int') out.setInt32(at, v)
    else if (type === 'float') out.setFloat32(at, v)
    else out.setFloat64(at, v)
  })
  return new Uint8Array(out.buffer)
}

function attributeList(out: Bytes, attributes: Record<string, NcValue | number> = {}) {
  const entries = Object.entries(attributes)
  if (!entries.length) { out.u32(0); out.u32(0); return }
  out.u32(TAG.attribute)
  out.u32(entries.length)
  for (const [name, value] of entries) {
    out.name(name)
    const type: NcType = typeof value === 'string' ? 'char' : 'double'
    const values = typeof value === 'number' ? [value] : value
    out.u32(TYPE_CODE[type])
    out.u32(values.length)
    out.raw(encodeValues(type, values))
    out.pad()
  }
}

/** Serialises the file; each variable's data must hold exactly the product of its dimensions. */
export function writeNetcdf(file: NcFile): Uint8Array {
  const dimNames = Object.keys(file.dimensions)
  const shape = (v: NcVariable) => v.dimensions.reduce((n, d) => {
    const size = file.dimensions[d]
    if (size === undefined) throw new Error(`unknown dimension ${d}`)
    return n * size
  }, 1)
  const sizes = file.variables.map((v) => {
    const count = shape(v)
    const given = typeof v.data === 'string' ? new TextEncoder().encode(v.data).length : v.data.length
    if (v.type !== 'char' && given !== count) throw new Error(`${v.name}: ${given} values for ${count} places`)
    const bytes = count * TYPE_SIZE[v.type]
    return { count, bytes, vsize: bytes + pad4(bytes) }
  })
  // The header's length does not depend on the offsets' values, so write it once to measure.
  const header = (offsets: number[]) => {
    const out = new Bytes()
    out.raw([0x43, 0x44, 0x46, 1])
    out.u32(0)
    if (dimNames.length) {
      out.u32(TAG.dimension)
      out.u32(dimNames.length)
      for (const d of dimNames) { out.name(d); out.u32(file.dimensions[d]!) }
    } else { out.u32(0); out.u32(0) }
    attributeList(out, file.attributes)
    out.u32(TAG.variable)
    out.u32(file.variables.length)
    file.variables.forEach((v, i) => {
      out.name(v.name)
      out.u32(v.dimensions.length)
      for (const d of v.dimensions) out.u32(dimNames.indexOf(d))
      attributeList(out, v.attributes)
      out.u32(TYPE_CODE[v.type])
      out.u32(sizes[i]!.vsize)
      out.u32(offsets[i] ?? 0)
    })
    return out
  }
  const headerLength = header([]).length
  const offsets: number[] = []
  let at = headerLength
  for (const s of sizes) { offsets.push(at); at += s.vsize }
  const out = header(offsets)
  file.variables.forEach((v, i) => {
    const data = encodeValues(v.type, v.data)
    const bytes = new Uint8Array(sizes[i]!.bytes)
    bytes.set(data.subarray(0, bytes.length))
    out.raw(bytes)
    out.pad()
  })
  return out.toArray()
}
