// The value lists the database stores as enums, each written once. The pgEnums in server/db/schema and the
// zod enums of the forms and routes are built from these arrays, so a value added here reaches both
// (then run `drizzle-kit generate`: the enum's migration follows from the change).

/** Roles per pond (memberships.role). */
export const POND_ROLES = ['owner', 'keeper', 'vet'] as const

export const FISH_SPECIES = ['koi', 'goldfish', 'other'] as const
export const FISH_SEXES = ['unknown', 'male', 'female'] as const
export const FISH_STATUSES = ['alive', 'deceased', 'rehomed'] as const

/** The units a person sees; values are always stored in metric. */
export const UNIT_SYSTEMS = ['metric', 'us'] as const
/** How a person writes decimals. */
export const DECIMAL_MARKS = ['point', 'comma'] as const

export const PHOTO_VIEWS = ['top', 'left', 'right', 'closeup', 'other'] as const
export const PHOTO_STATES = ['pending', 'ready', 'failed'] as const

/** Kinds a person writes through the timeline. 'photo' comes from the photos table, 'pond_event' from the pond's own events; moves and owner changes from the custody routes. */
export const ENTRY_KINDS = ['measurement', 'observation', 'exam', 'problem', 'procedure', 'anaesthesia', 'treatment', 'lab_result', 'companion', 'death'] as const
/** The kinds a timeline_entries row can have (the database enum). */
export const STORED_TIMELINE_KINDS = [...ENTRY_KINDS, 'photo', 'move', 'owner_change'] as const

/** Whole-pond treatments and events (pond_events.kind). */
export const WHOLE_POND_EVENT_KINDS = ['salt', 'bath', 'water_change', 'mortality'] as const
export const VISIT_PURPOSES = ['health_check', 'sick_call', 'surgery', 'follow_up'] as const
/** What happens to the members of a pond handed to a new owner. */
export const HANDOVER_MEMBERS_OPTIONS = ['stay', 'read_only', 'leave'] as const
/** Where a mail of the outbox stands. */
export const OUTGOING_MAIL_STATUSES = ['queued', 'sent', 'failed'] as const
