export type { PublicUser } from '@shared/api/users'
export type { MessageReply } from '@shared/api/endpoint'
