// Campus sign-in over OpenID Connect: the public surface for routes. Not auto-imported.
export { startCampusSignIn, finishCampusSignIn, type CampusOutcome } from './flow'
export { providerConfig, refusalFor } from './provider'
export { REQUEST_MINUTES } from './requests'
