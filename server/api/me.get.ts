import { findUserById } from '../repositories/users'
import { publicUser } from '../domain/accounts'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, [], { allowPasswordChange: true })
  const full = await findUserById(useDb(), user.id)
  return { user: publicUser(full!) }
})
