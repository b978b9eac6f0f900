import { describe, expect, it } from 'vitest'
import { depictSubstrate, positionLetter } from '../../shared/utils/depiction'
import { SubstrateError } from '../../shared/utils/halogenation'

const tags = (svg: string) => [...svg.matchAll(/<g><circle cx="([-\d.]+)" cy="([-\d.]+)" r="([\d.]+)"[^>]*\/><text[^>]*>([^<]+)<\/text><\/g>/g)]
  .map((m) => ({ x: Number(m[1]), y: Number(m[2]), r: Number(m[3]), label: m[4]! }))

describe('positionLetter', () => {
  it('letters a … z, then aa, ab', () => {
    expect([0, 1, 25, 26, 27, 51, 52].map(positionLetter)).toEqual(['a', 'b', 'z', 'aa', 'ab', 'az', 'ba'])
  })
})

describe('depictSubstrate', () => {
  it('draws 2-methylbutane with one tag per carbon, lettered in product order', () => {
    const svg = depictSubstrate('CCC(C)C')
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true)
    expect(tags(svg).map((t) => t.label)).toEqual(['a', 'b', 'c', 'd', 'd'])
    expect((svg.match(/<line /g) ?? []).length).toBe(4)
  })

  it('keeps tags apart from each other', () => {
    for (const smiles of ['CC(C)C(C)C', 'CC1CCCCC1', 'CCCCCl', 'CC(C)(C)C']) {
      const t = tags(depictSubstrate(smiles))
      for (let i = 0; i < t.length; i++) {
        for (let j = i + 1; j < t.length; j++) expect(Math.hypot(t[i]!.x - t[j]!.x, t[i]!.y - t[j]!.y)).toBeGreaterThan(t[i]!.r * 1.5)
      }
    }
  })

  it('has an accessible title describing the letters', () => {
    const svg = depictSubstrate('CCCCCl')
    expect(svg).toMatch(/role="img" aria-labelledby="substrate-title"/)
    expect(svg).toMatch(/<title id="substrate-title">Structure of C4H9Cl; the letters a, b, c, d mark/)
    expect(depictSubstrate('CCC', { title: 'Propane <b>' })).toContain('<title id="substrate-title">Propane &lt;b&gt;</title>')
  })

  it('contains no script, event handlers or external references', () => {
    for (const smiles of ['CCCCCl', 'ClC(Cl)Cl', 'C', 'BrCC(I)CF']) {
      const svg = depictSubstrate(smiles, { idPrefix: '"><script>alert(1)</script>' })
      expect(svg).not.toMatch(/<script|\son[a-z]+=|href|url\(|javascript:|class="event"|<style/i)
      expect(svg).toMatch(/id="scriptalert1script-title"/)
    }
  })

  it('draws halogen labels and a lone carbon', () => {
    expect(depictSubstrate('CCCCCl')).toMatch(/>Cl<\/text>/)
    expect(tags(depictSubstrate('C')).map((t) => t.label)).toEqual(['a'])
  })

  it('takes explicit labels or none', () => {
    expect(tags(depictSubstrate('CCC', { labels: false }))).toEqual([])
    expect(tags(depictSubstrate('CCC', { labels: [{ atoms: [1], label: 'x' }] })).map((t) => t.label)).toEqual(['x'])
  })

  it('is deterministic', () => {
    expect(depictSubstrate('CC(C)C(C)C')).toBe(depictSubstrate('CC(C)C(C)C'))
  })

  it('refuses a bad substrate with a SubstrateError', () => {
    expect(() => depictSubstrate('C1CC')).toThrow(SubstrateError)
  })
})
