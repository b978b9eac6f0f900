import type { Method } from '../../database/schema'
import type { SessionUser } from '#shared/types/auth'
import { REAGENT_HALOGEN, type MethodView } from '#shared/types/library'

// Halogenation methods: rows to views, and form fields to columns.

export function toMethodView(row: Method, me: SessionUser, usedBy: number): MethodView {
  return {
    id: row.id,
    name: row.name,
    reagent: row.reagent,
    halogen: row.halogen,
    temperatureC: row.temperatureC,
    reactivity: { primary: row.rPrimary, secondary: row.rSecondary, tertiary: row.rTertiary },
    source: row.source,
    notes: row.notes,
    shared: row.ownerId === null,
    mine: row.ownerId === me.id,
    usedBy,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  }
}

interface MethodFields {
  name?: string
  halogen?: 'Cl' | 'Br'
  reagent?: Method['reagent']
  temperatureC?: number
  reactivity?: { primary: number, secondary: number, tertiary: number }
  source?: string
  notes?: string
}

/** Form fields to columns (for a PATCH, only those given); the halogen follows from the reagent. */
export function methodColumns(input: MethodFields) {
  // A halogen sent with the form was checked against the reagent; the column follows the reagent.
  const { reactivity, reagent, halogen: _halogen, ...rest } = input
  return {
    ...rest,
    ...(reagent ? { reagent, halogen: REAGENT_HALOGEN[reagent] } : {}),
    ...(reactivity ? { rPrimary: reactivity.primary, rSecondary: reactivity.secondary, rTertiary: reactivity.tertiary } : {}),
  }
}

/** A complete method row from a validated form. */
export function newMethodRow(input: Required<Omit<MethodFields, 'halogen'>>, ownerId: number | null) {
  return {
    name: input.name,
    reagent: input.reagent,
    halogen: REAGENT_HALOGEN[input.reagent],
    temperatureC: input.temperatureC,
    rPrimary: input.reactivity.primary,
    rSecondary: input.reactivity.secondary,
    rTertiary: input.reactivity.tertiary,
    source: input.source,
    notes: input.notes,
    ownerId,
  }
}
