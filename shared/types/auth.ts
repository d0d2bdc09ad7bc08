export const userRoles = ['collector', 'maker', 'shipper'] as const
export type UserRole = typeof userRoles[number]

export interface SessionUser {
  id: number
  email: string
  name: string
  role: UserRole
}
