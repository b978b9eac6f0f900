// The outbox and the demo mailbox: what their routes may use. Not auto-imported.
export { outboxMessages, queueTestMessage, retryMessage } from './messages'
export { listMailbox, readMailboxFile, requireDemoMailbox } from './demo-mailbox'
export { mailVisibleTo } from './scope'
