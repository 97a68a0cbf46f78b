// One import point for tools outside the app (scripts, checks); the app itself auto-imports the modules.
export * from './microchip'
export * from './condition'
export * from './units'
export * from './water'
export * from './doses'
export * from './pond-volume'
