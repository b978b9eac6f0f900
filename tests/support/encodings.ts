// Byte encodings of text for upload tests: what Windows programs write as "Unicode text".

/** UTF-16 code units of the text, little- or big-endian, with or without a byte-order mark. */
export function utf16Bytes(text: string, endian: 'le' | 'be', bom: boolean): Uint8Array {
  const units = (bom ? '\uFEFF' : '') + text
  const out = new Uint8Array(units.length * 2)
  for (let i = 0; i < units.length; i++) {
    const unit = units.charCodeAt(i)
    out[2 * i + (endian === 'le' ? 0 : 1)] = unit & 0xff
    out[2 * i + (endian === 'le' ? 1 : 0)] = unit >> 8
  }
  return out
}

/** Windows-1252 bytes of text that stays within Latin-1's printable range (as older instruments write). */
export function latin1Bytes(text: string): Uint8Array {
  return Uint8Array.from(text, (c) => {
    const code = c.charCodeAt(0)
    if (code > 0xff) throw new Error(`not a Latin-1 character: ${c}`)
    return code
  })
}
