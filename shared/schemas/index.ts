export * from './common'
export * from './auth'
export * from './farms'
export * from './users'
