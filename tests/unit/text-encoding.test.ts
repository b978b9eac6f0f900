import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { decodeTextBytes } from '../../shared/utils/lib/text-encoding'
import { readUploadContent } from '../../shared/utils/lib/upload-content'
import { parsePeakTable, sniffUpload } from '../../shared/utils/chromatography'
import { simulatePeakTable, type ExportStyle } from '../../shared/utils/simulation'
import { latin1Bytes, utf16Bytes } from '../support/encodings'

// Byte encodings are open standards: UTF-16 (RFC 2781: big-endian unless a byte-order mark
// U+FEFF says otherwise), UTF-8 (RFC 3629; EF BB BF is U+FEFF encoded), and the WHATWG Encoding
// Standard's windows-1252 index (0xE4 is "ä", 0x80 is "€"; Latin-1 has no printable 0x80).

const table = 'Sample: Lösung 3\nRT [min]\tFläche\n1.250\t1500.5\n2.500\t2500.25\n'

describe('decodeTextBytes', () => {
  it.each([
    ['UTF-16LE with a BOM', utf16Bytes(table, 'le', true), 'utf-16le'],
    ['UTF-16BE with a BOM', utf16Bytes(table, 'be', true), 'utf-16be'],
    ['UTF-16LE without a BOM', utf16Bytes(table, 'le', false), 'utf-16le'],
    ['UTF-16BE without a BOM', utf16Bytes(table, 'be', false), 'utf-16be'],
    ['UTF-8 with a BOM', Uint8Array.from([0xef, 0xbb, 0xbf, ...new TextEncoder().encode(table)]), 'utf-8'],
    ['UTF-8 without a BOM', new TextEncoder().encode(table), 'utf-8'],
    ['Windows-1252', latin1Bytes(table), 'windows-1252'],
  ])('reads %s back to the same text, without the BOM', (_name, bytes, encoding) => {
    const decoded = decodeTextBytes(bytes)
    expect(decoded).toEqual({ ok: true, text: table, encoding })
  })

  it('reads "Fläche" from its Windows-1252 bytes 46 6C E4 63 68 65, and 0x80 as the euro sign', () => {
    expect(decodeTextBytes(Uint8Array.from([0x46, 0x6c, 0xe4, 0x63, 0x68, 0x65]))).toEqual({ ok: true, text: 'Fläche', encoding: 'windows-1252' })
    expect(decodeTextBytes(Uint8Array.from([0x80, 0x20, 0x31]))).toMatchObject({ text: '\u20ac 1' })
    // 0x93, 0x96, 0x94 are the typographic quotes and the en dash (same index).
    expect(decodeTextBytes(Uint8Array.from([0x93, 0x31, 0x96, 0x32, 0x94]))).toMatchObject({ text: '\u201c1\u20132\u201d' })
  })

  it('reads UTF-16 text with characters outside Latin-1 (a surrogate pair, CJK) without a BOM', () => {
    const text = 'RT,Area,Name\n1.2,300,\u4e2d\u6587 \ud83e\uddea\n'
    expect(decodeTextBytes(utf16Bytes(text, 'le', false))).toMatchObject({ ok: true, text })
  })

  it('refuses binary files: a PNG header, a zip header, random bytes with NULs', () => {
    const png = Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d, 0x49, 0x48, 0x44, 0x52, 0, 0, 0, 1])
    const zip = Uint8Array.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0, 0, 0, 8, 0, 0x21, 0, 0x5a, 0x1c, 0, 0])
    const noise = Uint8Array.from({ length: 400 }, (_, i) => (i * 7919) % 251)
    for (const bytes of [png, zip, noise]) expect(decodeTextBytes(bytes)).toMatchObject({ ok: false, reason: 'binary' })
  })

  it('refuses UTF-16 that is cut short or holds NUL characters, and an empty file', () => {
    const cut = utf16Bytes(table, 'le', true).subarray(0, 41)
    expect(decodeTextBytes(cut)).toMatchObject({ ok: false, reason: 'broken-utf16', message: expect.stringMatching(/cut short/) })
    expect(decodeTextBytes(utf16Bytes('RT,Area\n1,\u0000\u0000\u0000\n', 'le', true))).toMatchObject({ ok: false, reason: 'broken-utf16' })
    expect(decodeTextBytes(new Uint8Array(0))).toMatchObject({ ok: false, reason: 'empty' })
  })
})

describe('re-encoding a peak table as UTF-16 never changes what is read (property)', () => {
  const windows = [
    { productSmiles: 'CC(C)C(C)(C)Cl', rtMin: 3.0, rtMax: 3.25 },
    { productSmiles: 'CC(C)C(C)CCl', rtMin: 3.6, rtMax: 3.85 },
  ]
  const styles: ExportStyle[] = ['csv', 'semicolon-decimal-comma', 'tab', 'aligned', 'csv-seconds']
  // Notes a lab writes into a sample line: umlauts, micro and degree signs, CJK, an emoji.
  const note = fc.string({ unit: fc.constantFrom(...'Probe Lösung µL 40°C Säule é 中文 ', '\ud83e\uddea'), maxLength: 30 })

  it('UTF-16LE/BE, with or without a BOM: the same text, sniff and parse as the UTF-8 file', async () => {
    await fc.assert(fc.asyncProperty(
      fc.integer({ min: 1, max: 10_000 }), fc.constantFrom(...styles), fc.constantFrom('le' as const, 'be' as const), fc.boolean(), note,
      async (seed, style, endian, bom, sample) => {
        const distribution = [
          { smiles: windows[0]!.productSmiles, percent: 60 },
          { smiles: windows[1]!.productSmiles, percent: 40 },
        ]
        const sim = simulatePeakTable({ seed, windows, distribution, style })
        const text = `Sample: ${sample}\n${sim.text}`
        const content = await readUploadContent(utf16Bytes(text, endian, bom))
        expect(content.source).toEqual({ kind: 'text', text })
        const decoded = content.source.kind === 'text' ? content.source.text : ''
        expect(sniffUpload(decoded)).toEqual(sniffUpload(text))
        expect(parsePeakTable(decoded)).toEqual(parsePeakTable(text))
        expect(parsePeakTable(decoded).errors).toEqual([])
      },
    ), { numRuns: 150 })
  })
})
