import { z } from 'zod'

/** Who the shop is: shown in page footers and at the foot of every e-mail. */
export const shopProfileSchema = z.object({
  name: z.string().trim().min(1, 'name is required').max(120).default('Groovewright demo workshop'),
  addressLines: z.array(z.string().trim().max(120)).max(6).default(['Unit 3, Tallow Yard', '14 Chandlers Row', 'Lowmere LM4 7QT']),
  email: z.email().default('workshop@groovewright.test'),
  phone: z.string().trim().max(40).default(''),
})

export type ShopProfile = z.infer<typeof shopProfileSchema>
