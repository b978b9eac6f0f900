// One's own account: what the account routes may use. Not auto-imported.
export { changePassword, refuseCommonPassword } from './password'
