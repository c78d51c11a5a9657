/**
 * Client configuration, read once. The client has no secrets: everything here is either
 * a build-time constant or comes from Vite's `import.meta.env`.
 */
export const config = {
  appName: 'Skyfurrow',
  /** Base path of the JSON API; in development Vite proxies it to the Express server. */
  apiBase: '/api',
  /** Rows per page in admin tables before the user changes it. */
  defaultPageSize: 20,
  /** Time shown by ant-design-vue `message` toasts, in seconds. */
  messageDurationS: 5,
  /**
   * Optional imagery under the Fields map: an XYZ tile URL template with {z}/{x}/{y}
   * (VITE_MAP_TILE_URL at build time). Empty: the map stays offline (plain background).
   */
  mapTileUrl: ((import.meta.env.VITE_MAP_TILE_URL as string | undefined) ?? '').trim(),
  /** Attribution text shown with that imagery (VITE_MAP_TILE_ATTRIBUTION). */
  mapTileAttribution: ((import.meta.env.VITE_MAP_TILE_ATTRIBUTION as string | undefined) ?? '').trim(),
} as const

/**
 * The safety caution, word for word as the product design states it. Shown on the About
 * page, at sign-in and (later) with every forecast.
 */
export const safetyCaution =
  'Forecasts cover satellite geometry and the obstructions that were drawn. They do not ' +
  'cover multipath, ionospheric storms, correction-link outages, receiver faults or ' +
  'unmapped obstacles. Auto-steer must be supervised. Drainage grades and levelling ' +
  'designs must be checked against local codes and by licensed practitioners.'
