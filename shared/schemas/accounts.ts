import { z } from 'zod'

// Input shapes shared by the forms and the routes.
export const RoleSchema = z.enum(['admin', 'manager', 'tech', 'painter', 'auditor'], {
  error: 'Choose one of: admin, manager, tech, painter, auditor',
})

export const EmailSchema = z
  .string({ error: 'Enter an e-mail address' })
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: 'Enter a valid e-mail address' }))

// NIST SP 800-63B asks for at least 8 characters and a generous maximum; we ask for 10.
export const NewPasswordSchema = z
  .string({ error: 'Enter a password' })
  .min(10, 'Use at least 10 characters')
  .max(200, 'Use at most 200 characters')

export const LoginSchema = z.object({
  email: EmailSchema,
  password: z.string({ error: 'Enter your password' }).min(1, 'Enter your password').max(200),
})

export const ChangePasswordSchema = z.object({
  current: z.string({ error: 'Enter your current password' }).min(1, 'Enter your current password').max(200),
  next: NewPasswordSchema,
})

export const CreateUserSchema = z.object({
  email: EmailSchema,
  name: z.string({ error: 'Enter a name' }).trim().min(1, 'Enter a name').max(120),
  role: RoleSchema,
  password: NewPasswordSchema,
})

export const UpdateUserSchema = z
  .object({
    name: z.string().trim().min(1, 'Enter a name').max(120).optional(),
    role: RoleSchema.optional(),
    disabled: z.boolean().optional(),
  })
  .refine((v) => Object.keys(v).length > 0, { message: 'Nothing to change' })

export const ResetPasswordSchema = z.object({ password: NewPasswordSchema })

export const PinSchema = z.object({
  pin: z.string().regex(/^\d{4,6}$/, 'A PIN is 4 to 6 digits'),
})
