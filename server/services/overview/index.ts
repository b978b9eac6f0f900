// The role home pages' cards: what the overview routes may use. Not auto-imported.
export { classResultCard, nextLabCard, reviewCards, scheduleAhead, stockroomCards } from './cards'
