// The invented demo scenario: one household with two ponds, its keepers, and a vet who also serves another client.
export const DEMO_PASSWORD = 'pondside-demo-2026'

export const people = {
  owner: { name: 'Helen Marlow', email: 'helen.marlow@example.com', note: 'owner of both household ponds' },
  family: { name: 'Tom Marlow', email: 'tom.marlow@example.com', note: 'family member, keeper of both household ponds' },
  keeper: { name: 'Priya Anand', email: 'priya.anand@example.com', note: 'outside pond keeper, keeper of the Garden pond' },
  vet: { name: 'Dr Ada Okafor', email: 'ada.okafor@example.com', note: 'aquatic vet of the household ponds and of the Whitlock pond' },
  otherClient: { name: 'Sam Whitlock', email: 'sam.whitlock@example.com', note: 'an unrelated client: owner of the Whitlock pond' },
} as const

export type PersonKey = keyof typeof people
