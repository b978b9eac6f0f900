// The substrate library and the methods, with the chemistry they are computed with (in the
// engine worker, remembered per SMILES). Routes import from here.

export { canonicalForms, reagentForms, substrateAnalysis, substrateDepiction, substrateProductSmiles } from './chemistry-cache'
export { copyName, libraryScope, libraryUsage, requireLibraryEntry, requireLibraryReader } from './library-access'
export {
  addStandardRun, copyMethod, copySubstrate, createMethod, createSubstrate, deleteLibraryEntry, deleteSubstrateReference,
  saveSubstrateWindows,
  setSubstrateReference, updateMethod, updateSubstrate,
} from './library-commands'
export { toMethodView } from './methods'
export { substrateProductNamer, substrateReferenceFor, type ProductNamer } from './product-names'
export { referenceCandidates, resolveReferencePercents, substrateReferenceViews } from './reference-distributions'
export { libraryProducts, renameLibraryProducts, resolveProductNames, resolveWindows, windowView } from './substrate-products'
export { substrateDetail, substrateIdentity, toSubstrateListItem } from './substrate-views'
