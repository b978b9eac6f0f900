// CAS Registry Numbers: 2 to 7 digits, 2 digits, 1 check digit ("7732-18-5"). The check digit is
// the sum of the other digits weighted 1, 2, 3, ... from the right, modulo 10. Pure.

const CAS_SHAPE = /^(\d{2,7})-(\d{2})-(\d)$/

/** What is wrong with a CAS number, or null when its shape and check digit are right. */
export function casNumberProblem(value: string): string | null {
  const match = CAS_SHAPE.exec(value)
  if (!match) return 'Write a CAS number as digits-2 digits-check digit, e.g. 7732-18-5'
  const digits = (match[1]! + match[2]!).split('').reverse()
  const sum = digits.reduce((total, digit, i) => total + Number(digit) * (i + 1), 0)
  return sum % 10 === Number(match[3]) ? null : 'The check digit does not match: look for a typing slip'
}

/** "  7732 18 5 " / "7732-18-5" -> "7732-18-5"; anything else is returned trimmed, for the check to refuse. */
export function normalCasNumber(value: string): string {
  const trimmed = value.trim()
  const bare = /^(\d{2,7})[\s-]?(\d{2})[\s-]?(\d)$/.exec(trimmed)
  return bare ? `${bare[1]}-${bare[2]}-${bare[3]}` : trimmed
}
