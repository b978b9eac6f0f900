import type { Migration } from 'kysely'
import * as createUsers from './2026_12_01_0900_create_users'
import * as createMailMessages from './2026_12_01_0910_create_mail_messages'
import * as createCourses from './2026_12_01_1100_create_courses'
import * as createSubmissions from './2026_12_01_1300_create_submissions'
import * as createDigests from './2026_12_01_1400_create_digests'
import * as createStockroom from './2026_12_01_1500_create_stockroom'
import * as outlierTestGesd from './2026_12_03_0930_outlier_test_gesd'
import * as substrateReferences from './2026_12_03_0940_substrate_references'
import * as loginAttemptsPending from './2026_12_03_1000_login_attempts_pending'
import * as mailClaims from './2026_12_03_1200_mail_claims'
import * as calendarFeedHashes from './2026_12_03_1210_calendar_feed_hashes'
import * as resubmitDue from './2026_12_03_1310_resubmit_due'
import * as rosterStudentIds from './2026_12_03_1320_roster_student_ids'
import * as taDailySummary from './2026_12_03_1340_ta_daily_summary'
import * as orderReceipts from './2026_12_03_1400_order_receipts'
import * as readerSourceLines from './2026_12_03_1410_reader_source_lines'
import * as casNumbersPreparedSolutions from './2026_12_03_1420_cas_numbers_prepared_solutions'
import * as campusSignInRequests from './2026_12_03_1500_campus_sign_in_requests'
import * as departmentScaleIndexes from './2026_12_03_1500_department_scale_indexes'
import * as campusJoinedAt from './2026_12_03_1600_campus_joined_at'
import * as uploadStorageLz4 from './2026_12_03_1610_upload_storage_lz4'
import * as latestVersionCover from './2026_12_03_1700_latest_version_cover'
import * as packedPeaks from './2026_12_03_1900_packed_peaks'

// A static registry: after `nuxt build` the .ts files are not on disk, so Kysely's
// FileMigrationProvider cannot find them. Add each new migration here, in name order.
export const migrations: Record<string, Migration> = {
  '2026_12_01_0900_create_users': createUsers,
  '2026_12_01_0910_create_mail_messages': createMailMessages,
  '2026_12_01_1100_create_courses': createCourses,
  '2026_12_01_1300_create_submissions': createSubmissions,
  '2026_12_01_1400_create_digests': createDigests,
  '2026_12_01_1500_create_stockroom': createStockroom,
  '2026_12_03_0930_outlier_test_gesd': outlierTestGesd,
  '2026_12_03_0940_substrate_references': substrateReferences,
  '2026_12_03_1000_login_attempts_pending': loginAttemptsPending,
  '2026_12_03_1200_mail_claims': mailClaims,
  '2026_12_03_1210_calendar_feed_hashes': calendarFeedHashes,
  '2026_12_03_1310_resubmit_due': resubmitDue,
  '2026_12_03_1320_roster_student_ids': rosterStudentIds,
  '2026_12_03_1340_ta_daily_summary': taDailySummary,
  '2026_12_03_1400_order_receipts': orderReceipts,
  '2026_12_03_1410_reader_source_lines': readerSourceLines,
  '2026_12_03_1420_cas_numbers_prepared_solutions': casNumbersPreparedSolutions,
  '2026_12_03_1500_campus_sign_in_requests': campusSignInRequests,
  '2026_12_03_1500_department_scale_indexes': departmentScaleIndexes,
  '2026_12_03_1600_campus_joined_at': campusJoinedAt,
  '2026_12_03_1610_upload_storage_lz4': uploadStorageLz4,
  '2026_12_03_1700_latest_version_cover': latestVersionCover,
  '2026_12_03_1900_packed_peaks': packedPeaks,
}
