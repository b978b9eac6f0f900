// Reviewing results: what routes may use. scope.ts decides who reviews what; queue.ts and
// detail.ts read; decisions.ts and release.ts are the commands; grade-sheet.ts and downloads.ts
// serve files.
export { requireReviewableSubmission, requireReviewerOf, type ReviewerScope } from './scope'
export { requireReviewQueuePage, reviewPracticalItems, reviewQueueJson, reviewQueueOf } from './queue'
export { buildSubmissionDetail } from './detail'
export { acceptCleanInBulk, saveSubmissionReview, setSubmissionExclusion, type BulkAcceptQueue, type ReviewContext } from './decisions'
export { setPracticalRelease } from './release'
export { scoresReleased } from './release-policy'
export { buildGradeSheet } from './grade-sheet'
export { isReviewUnitMember, reviewSafeFileName, setReviewDownloadHeaders, submissionFile } from './downloads'
