// The substrate library and the methods, with the chemistry they are computed with. Routes import from here.

export { canonicalForms, reagentForms, substrateAnalysis, substrateDepiction } from './chemistry-cache'
export { copyName, deleteLibraryEntry, libraryProducts, libraryScope, libraryUsage, methodColumns, newMethodRow, refuseWhileInUse, renameLibraryProducts, requireLibraryEntry, requireLibraryReader, resolveProductNames, resolveWindows, substrateDetail, substrateIdentity, toMethodView, toSubstrateListItem, windowView } from './library'
export { substrateProductNamer, substrateReferenceFor } from './product-names'
export { referenceCandidates, resolveReferencePercents, substrateReferenceViews } from './reference-distributions'
