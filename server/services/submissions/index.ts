// Uploads and the student's own results: what routes may use. work-units.ts names whose result a
// submission is, student-unit.ts reads a student's unit; practical-chemistry.ts loads what a practical's runs are computed against.
export { computeRun, createSubmission, previewOf, storeSubmissionVersion } from './uploads'
export { enrolmentColumns, studentUnit, uploadColumns, type StudentWorkUnit } from './student-unit'
export { mySubmissionsOf, type MySubmissionsView } from './student-view'
export { expectationView, practicalChemistry, referenceShare } from './practical-chemistry'
export { stationOfUnitKey, unitKeyOf } from './work-units'
