export type { PublicUser } from '@shared/api/users'

export interface MessageReply {
  message: string
}
