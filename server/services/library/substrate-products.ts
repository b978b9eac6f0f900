import type { SubstrateWindow, WindowKind } from '../../database/schema'
import type { LibraryProduct, ProductNameInput, SubstrateWindowView, WindowInput } from '#shared/types/library'
import { builtInProductName } from '#shared/data/product-names'
import { positionLetter } from '#shared/utils/depiction'
import { describeOverlap, findWindowOverlaps, windowDisplayName, type NamedTimeWindow } from '#shared/utils/windows'
import { messageExcerpt } from '#shared/utils/text-input'
import { invalid } from '../../utils/validation'
import { canonicalForms, substrateAnalysis } from './chemistry-cache'

// A substrate's products as the library shows them (lettered, each with its bromo twin and
// names), and the checks on what an instructor saves against them: names and retention windows.

/** Chlorination products, lettered as the depiction letters them, each with its bromo twin and their names. */
export async function libraryProducts(smiles: string,
  nameOf: (smiles: string) => string | null = builtInProductName): Promise<LibraryProduct[]> {
  const [cl, br] = await Promise.all([substrateAnalysis(smiles, 'Cl'), substrateAnalysis(smiles, 'Br')])
  return cl.products.map((p, i) => {
    const brominated = (br.products.find((q) => q.atoms[0] === p.atoms[0]) ?? br.products[i]!).smiles
    return {
      label: positionLetter(i),
      smiles: p.smiles,
      brominated,
      name: nameOf(p.smiles),
      brominatedName: nameOf(brominated),
      hydrogens: p.hydrogens,
      carbonClass: p.carbonClass,
    }
  })
}

/**
 * A client's SMILES for products in canonical form (read in one engine task), or a 400 naming
 * the field of the first that cannot be read.
 */
export async function canonicalOrInvalid(items: Array<{ smiles: string, field: string }>): Promise<string[]> {
  const forms = await canonicalForms(items.map((i) => i.smiles))
  return items.map((item,
    i) => forms[i] ?? invalid([{ field: item.field, message: `“${messageExcerpt(item.smiles, 60)}” is not a readable SMILES` }]))
}

/** The same products with names from another source (after the instructor renamed some). */
export function renameLibraryProducts(products: LibraryProduct[], nameOf: (smiles: string) => string | null): LibraryProduct[] {
  return products.map((p) => ({ ...p, name: nameOf(p.smiles), brominatedName: nameOf(p.brominated) }))
}

/**
 * The names to store for a substrate's products: each SMILES matched to one of its products
 * (any spelling), no product twice; a name equal to the built-in one, or empty, stores nothing.
 */
export async function resolveProductNames(names: ProductNameInput[], products: LibraryProduct[],
  substrateName: string): Promise<Array<{ productSmiles: string, name: string }>> {
  const index = productIndex(products)
  const seen = new Set<string>()
  const rows: Array<{ productSmiles: string, name: string }> = []
  const forms = await canonicalOrInvalid(names.map((n, i) => ({ smiles: n.productSmiles, field: `names.${i}.productSmiles` })))
  names.forEach((n, i) => {
    const field = `names.${i}.productSmiles`
    const canonical = forms[i]!
    if (!index.has(canonical)) invalid([{ field,
      message: `“${messageExcerpt(n.productSmiles, 60)}” is not a monohalogenation product of ${substrateName}` }])
    if (seen.has(canonical)) invalid([{ field, message: `${canonical} is named twice` }])
    seen.add(canonical)
    const name = n.name.trim()
    if (name && name !== builtInProductName(canonical)) rows.push({ productSmiles: canonical, name })
  })
  return rows
}

interface ProductRef { position: string, halogen: 'Cl' | 'Br', smiles: string }

function productIndex(products: LibraryProduct[]): Map<string, ProductRef> {
  const index = new Map<string, ProductRef>()
  for (const p of products) {
    index.set(p.smiles, { position: p.label, halogen: 'Cl', smiles: p.smiles })
    index.set(p.brominated, { position: p.label, halogen: 'Br', smiles: p.brominated })
  }
  return index
}

export function windowView(w: SubstrateWindow, products: LibraryProduct[]): SubstrateWindowView {
  const ref = w.productSmiles ? productIndex(products).get(w.productSmiles) : undefined
  return {
    id: w.id,
    kind: w.kind,
    productSmiles: w.productSmiles,
    position: ref?.position ?? null,
    halogen: ref?.halogen ?? null,
    label: w.label,
    rtMin: w.rtMin,
    rtMax: w.rtMax,
    responseFactor: w.responseFactor,
  }
}

export interface WindowRowValues {
  kind: WindowKind
  productSmiles: string | null
  label: string
  rtMin: number
  rtMax: number
  responseFactor: number
}

/**
 * Matches each product window to the substrate's products (any SMILES spelling), then refuses
 * duplicates and overlapping windows, naming the rows. Returns the rows to store.
 */
export async function resolveWindows(windows: Array<WindowInput & { responseFactor: number }>, products: LibraryProduct[],
  substrateName: string): Promise<WindowRowValues[]> {
  const index = productIndex(products)
  const seen = new Map<string, number>()
  const named = windows.flatMap((w,
    i) => (w.kind === 'product' ? [{ smiles: w.productSmiles!, field: `windows.${i}.productSmiles`, i }] : []))
  const forms = new Map((await canonicalOrInvalid(named)).map((form, k) => [named[k]!.i, form]))
  const rows = windows.map((w, i): WindowRowValues & NamedTimeWindow => {
    const field = `windows.${i}.productSmiles`
    let ref: ProductRef | undefined
    if (w.kind === 'product') {
      const canonical = forms.get(i)!
      ref = index.get(canonical)
      if (!ref) invalid([{ field,
        message: `“${messageExcerpt(w.productSmiles ?? '', 60)}” is not a monohalogenation product of ${substrateName}` }])
      if (seen.has(ref.smiles)) invalid([{ field,
        message: `${ref.position} (${ref.smiles}) already has a window in row ${seen.get(ref.smiles)! + 1}` }])
      seen.set(ref.smiles, i)
    }
    const label = w.kind === 'product' ? ref!.position : (w.label?.trim() || (w.kind === 'solvent' ? 'solvent' : 'starting material'))
    return {
      kind: w.kind,
      productSmiles: ref?.smiles ?? null,
      label,
      rtMin: w.rtMin,
      rtMax: w.rtMax,
      responseFactor: w.responseFactor,
      name: windowDisplayName({ kind: w.kind, position: ref?.position, halogen: ref?.halogen, productSmiles: ref?.smiles, label }),
      group: ref?.halogen ?? null,
    }
  })
  const [overlap] = findWindowOverlaps(rows)
  if (overlap) {
    const message = describeOverlap(overlap)
    invalid(overlap.map((w) => ({ field: `windows.${rows.indexOf(w)}`, message })))
  }
  return rows.map(({ name: _name, group: _group, ...values }) => values)
}
