import { z } from 'zod'

// The commonest passwords from public breach lists, lower-cased; refused outright.
const commonPasswords = new Set([
  '12345678', '123456789', '1234567890', 'password', 'password1', 'password123', 'qwertyuiop', 'qwerty123',
  '11111111', '00000000', '87654321', '12341234', 'iloveyou', 'sunshine', 'princess', 'football', 'baseball',
  'welcome1', 'welcome123', 'abc12345', 'abcd1234', 'letmein1', 'trustno1', 'superman', 'starwars', 'whatever',
  'passw0rd', 'p@ssw0rd', 'p@ssword', 'qwerty12', 'asdfghjk', 'asdfghjkl', 'zxcvbnm1', '1q2w3e4r', '1qaz2wsx',
  'q1w2e3r4', 'qazwsxedc', 'michael1', 'jennifer', 'computer', 'internet', 'master12', 'dragon12', 'monkey12',
  'shadow12', 'mustang1', 'charlie1', 'liverpool', 'chelsea1', 'corvette', 'mercedes', 'changeme', 'changeme1',
  'admin123', 'administrator', 'secret12', 'default1', 'groovewright',
])

export function isCommonPassword(candidate: string): boolean {
  return commonPasswords.has(candidate.toLowerCase())
}

/** "x is required" when missing, "x must be text" when some other type came. */
export function requiredText(field: string) {
  return z.string({ error: issue => (issue.input === undefined || issue.input === null ? `${field} is required` : `${field} must be text`) })
}

export const emailField = requiredText('email')
  .trim()
  .max(254, 'email is too long')
  .pipe(z.email({ error: 'email is not a valid address' }))
  .transform(value => value.toLowerCase())

export const newPasswordField = requiredText('password')
  .min(8, 'password must be at least 8 characters')
  .max(128, 'password must be at most 128 characters')
  .refine(value => !isCommonPassword(value), 'password is one of the commonest passwords; choose another')

export const registerSchema = z.object({
  email: emailField,
  name: requiredText('name').trim().min(1, 'name is required').max(120, 'name is too long'),
  password: newPasswordField,
})

/** The first maker of a shop without one (/setup): an account plus the setup code from the server's log. */
export const setupSchema = registerSchema.extend({
  code: requiredText('code').min(1, 'code is required').max(200, 'code is not right'),
})

export const loginSchema = z.object({
  email: emailField,
  password: requiredText('password').min(1, 'password is required').max(128, 'password is too long'),
})

export const passwordChangeSchema = z.object({
  currentPassword: requiredText('currentPassword').min(1, 'currentPassword is required').max(128, 'currentPassword is too long'),
  newPassword: newPasswordField,
})

export const resetRequestSchema = z.object({ email: emailField })

export const resetSchema = z.object({
  token: requiredText('token').min(20, 'token is not valid').max(200, 'token is not valid'),
  password: newPasswordField,
})

export const roleChangeSchema = z.object({
  role: z.enum(['collector', 'maker', 'shipper'], { error: 'role must be collector, maker or shipper' }),
})
