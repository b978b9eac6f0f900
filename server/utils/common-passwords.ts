// A short deny-list of passwords that meet the length rule yet are among the first an attacker
// tries (common practice: the longest entries of widely published leaked-password lists,
// keyboard walks, and this product's own published demo password).
const COMMON = new Set([
  '123456789012', '1234567890123', '12345678901234', '123456789123', '111111111111', '000000000000',
  '123123123123', '121212121212', '987654321098', 'qwertyuiopas', 'qwertyuiop12', 'qwertyuiop123',
  'qwerty123456', '1qaz2wsx3edc', '1q2w3e4r5t6y', 'q1w2e3r4t5y6', 'zaq12wsxcde3', 'asdfghjkl123',
  'password1234', 'password12345', 'password123456', 'passwordpassword', 'password!234', 'p@ssw0rd1234',
  'iloveyou1234', 'letmein12345', 'welcome12345', 'welcome123456', 'changeme1234', 'administrator',
  'abcdefghijkl', 'abcd12345678', 'abc123456789', 'aaaaaaaaaaaa', 'monkey123456', 'football1234',
  'baseball1234', 'sunshine1234', 'princess1234', 'superman1234', 'starwars1234', 'trustno11234',
  'dragon123456', 'master123456', 'shadow123456', 'whatever1234', 'chemistry123', 'chemistry1234',
  'organicchemistry', 'laboratory12', 'halocline123', 'halocline1234', 'halocline-demo', 'haloclinedemo',
  'student12345', 'student123456', 'teacher12345', 'instructor12', 'larkspur1234',
])

export function isCommonPassword(password: string): boolean {
  const p = password.trim().toLowerCase()
  if (COMMON.has(p)) return true
  // One repeated character, or a single short block repeated, is as weak as the list.
  return /^(.)\1+$/.test(p) || /^(.{1,4})\1+$/.test(p)
}
