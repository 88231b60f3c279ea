import { listUsers } from '../../repositories/users'
import { publicUser } from '../../domain/accounts'

export default defineEventHandler(async (event) => {
  await requireUser(event, ['admin'])
  return { users: (await listUsers(useDb())).map(publicUser) }
})
