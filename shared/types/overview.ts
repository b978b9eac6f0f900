export type OverviewTone = 'neutral' | 'ok' | 'warning' | 'danger' | 'info'

/** One figure on a role's overview, with where to act on it. */
export interface OverviewCard {
  title: string
  value: string
  detail: string
  to?: string
  action?: string
  tone?: OverviewTone
}

export interface Overview {
  role: string
  name: string
  cards: OverviewCard[]
}
