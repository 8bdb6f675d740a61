/** The three roles; each user has exactly one. */
export const ROLES = ['observer', 'classifier', 'lead'] as const
export type Role = (typeof ROLES)[number]

export const ROLE_LABELS: Record<Role, string> = {
  observer: 'Observer',
  classifier: 'Classifier',
  lead: 'Lead',
}
