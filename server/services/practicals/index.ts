// Practicals: the practical, its scale (items), sessions and procedure card. Routes import from here.

export { createPractical, deletePractical, savePracticalItems, setPracticalSessions, updatePractical } from './practical-commands'
export { checkedItems } from './practical-items'
export {
  coursePracticals, practicalDetail, practicalItemViews, practicalSessionViews, procedureCard, readPracticalDetail,
} from './practical-views'
