// Class results: what routes may use. latest-versions.ts holds the one rule behind every class
// figure (each work unit's latest accepted-or-pending version); the rest read through it.
export { latestClassResults, latestUnitVersions, storedMolePercents, type ClassRow } from './latest-versions'
export { practicalSummary, practicalSummaryJson, requireSummaryAccess } from './summary'
export { crossTermComparison } from './cross-term'
export { resultsList } from './results-list'
export { resultsPracticalDetail } from './practical-detail'
export { classFactorStats, classOutlierReport } from './class-statistics'
export { classExampleFor } from './class-example'
