// Roles and the password rule the pages show, without zod: the header and the account pages
// import these on every signed-in page, and the schemas in auth.ts would bring zod along.
// The `Role` type stays in auth.ts (one auto-imported name, one home).
export const ROLES = ['instructor', 'ta', 'coordinator', 'student'] as const

export const ROLE_LABELS: Record<(typeof ROLES)[number], string> = {
  instructor: 'Instructor',
  ta: 'Teaching assistant',
  coordinator: 'Lab coordinator',
  student: 'Student',
}

export const PASSWORD_MIN_LENGTH = 12
