// Section digests: what routes may use. data.ts loads a section's figures and recipients,
// templates.ts writes the messages, send.ts queues them (a command), history.ts reads them back.
export { sendDigests, type DigestSendInput } from './send'
export { digestPreview, digestRecipientFor } from './preview'
export { digestHistory } from './history'
export { digestUnitMembers, loadDigestContext } from './data'
