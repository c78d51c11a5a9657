// Import rules checked by `npm run deps` (and by `npm test`): no import cycles anywhere,
// and business rules (server/services) never reach into the job runner (server/jobs):
// they enqueue through server/queue, and the forecast inputs live in server/forecast.
/** @type {import('dependency-cruiser').IConfiguration} */
module.exports = {
  forbidden: [
    {
      name: 'no-circular',
      severity: 'error',
      comment: 'Modules that import each other, directly or through others (type-only imports count too).',
      from: {},
      to: { circular: true },
    },
    {
      name: 'services-not-to-jobs',
      severity: 'error',
      comment: 'Services enqueue through server/queue; the job runner and handlers are not theirs to import.',
      from: { path: '^server/services/' },
      to: { path: '^server/jobs/' },
    },
    {
      name: 'shared-stays-pure',
      severity: 'error',
      comment: 'shared/ (engine, schemas, planning) runs in the browser and in Node: no server, client or framework imports.',
      from: { path: '^shared/' },
      to: { path: '^(server|src)/|node_modules/(express|drizzle-orm|mysql2|vue|pinia)/' },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    exclude: { path: '^(node_modules|dist|tests/\\.artifacts)/' },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.app.json' },
    enhancedResolveOptions: { extensions: ['.ts', '.mjs', '.js', '.vue', '.json'] },
  },
}
