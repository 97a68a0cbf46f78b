// Passwords of 10+ characters seen most often in public breach lists (from memory of such lists); shorter ones fail the length rule anyway.
export const COMMON_PASSWORDS = new Set([
  '1234567890', '0123456789', '12345678910', '123456789a', 'password12', 'password123', 'password1234',
  'passw0rd123', 'qwertyuiop', 'qwerty1234', 'qwerty12345', 'qwerty123456', '1q2w3e4r5t', '1qaz2wsx3edc',
  'iloveyou12', 'iloveyou123', 'abcdefghij', 'abcd123456', 'abc1234567', 'aaaaaaaaaa', '1111111111',
  '0000000000', '9876543210', 'football123', 'baseball123', 'princess123', 'sunshine123', 'welcome123',
  'letmein123', 'monkey1234', 'dragon1234', 'master1234', 'superman123', 'trustno1234', 'starwars123',
  'changeme123', 'administrator', 'admin12345', 'adminadmin', 'computer123', 'whatever123', 'michael123',
  'jennifer123', 'charlie123', 'qazwsxedcrfv', 'zaq12wsxcde', 'asdfghjkl1', 'asdfghjkl;', 'zxcvbnm123',
  'passwordpassword', 'password!', 'password01', 'p@ssw0rd123', 'Password123', 'Password1!',
  'fintrail123', 'fintrail2026', 'koikoikoi1', 'goldfish123', 'koipond123', 'pondlife123',
])

export function isCommonPassword(password: string): boolean {
  return COMMON_PASSWORDS.has(password) || COMMON_PASSWORDS.has(password.toLowerCase())
}
