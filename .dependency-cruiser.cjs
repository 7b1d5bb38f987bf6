/**
 * The dependency rule (DEVELOPERS.md, "Which way imports point"): app → lib/<domain> →
 * lib/db/queries → knex. `npm run deps` checks it; .ci/run runs it before the tests.
 * Violations that existed when a rule was introduced are listed in
 * .dependency-cruiser-known-violations.json (`npm run deps:baseline` rewrites it); the check fails
 * on any new one. Shrink that file, never grow it.
 */
module.exports = {
  forbidden: [
    {
      name: 'lib-not-to-app',
      severity: 'error',
      comment: 'Domain code (lib/) never imports routes (app/) or UI (components/): move the shared piece into lib/<domain>/.',
      from: { path: '^lib/' },
      to: { path: '^(app|components)/' },
    },
    {
      name: 'queries-are-sql-only',
      severity: 'error',
      comment:
        'lib/db/queries hold SQL only: no HTTP errors (lib/errors), no audit entries, no jobs, no services. Decide, audit and enqueue in lib/<domain>/<verb-noun>.ts.',
      from: { path: '^lib/db/queries/' },
      to: {
        path: '^(lib|app|components)/',
        pathNot: [
          '^lib/db/',
          '^lib/(nifti|decomposition|agreement|phantom)/',
          '^lib/[^/]+/(schema|types|labels|roles|keys|status)\\.ts$',
          '^lib/vocabulary/',
          '^lib/bids\\.ts$',
        ],
      },
    },
    {
      name: 'vocabulary-is-a-leaf',
      severity: 'error',
      comment:
        'lib/vocabulary holds the words (roles, protocol keys, stored record shapes) that queries and domains share; it imports nothing from app, components or other lib domains, so importing it never makes a cycle.',
      from: { path: '^lib/vocabulary/' },
      to: { path: '^(lib|app|components)/', pathNot: '^lib/vocabulary/' },
    },
    {
      name: 'knex-only-in-db',
      severity: 'error',
      comment:
        "Only lib/db (knex.ts, queries) and db/ (migrations, seeds) talk to knex, its types included (`import type { Knex } from 'knex'` counts: tsPreCompilationDeps); everything else calls a query function and types connections with Db / Trx from lib/db/transaction.ts.",
      from: {
        path: '^(app|components|lib)/',
        pathNot: '^lib/db/',
      },
      to: { path: ['^node_modules/knex/', '^lib/db/knex\\.ts$'] },
    },
    {
      name: 'no-circular',
      severity: 'error',
      comment: 'Import cycles tie modules together so neither can change alone: move the shared part into the lower module.',
      from: { path: '^(app|components|lib)/' },
      to: { circular: true },
    },
    {
      name: 'components-not-to-app-api',
      severity: 'error',
      comment: 'Components take schemas from lib/<domain>/schema.ts, never from app/api/**.',
      from: { path: '^components/' },
      to: { path: '^app/api/' },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    // node_modules is not followed but must not be excluded: an excluded module drops the
    // dependencies on it, and knex-only-in-db would never see an import of knex.
    exclude: { path: '^(\\.next|\\.data|uploads)/' },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    enhancedResolveOptions: {
      exportsFields: ['exports'],
      conditionNames: ['import', 'require', 'node', 'default', 'types'],
      mainFields: ['module', 'main', 'types', 'typings'],
      extensions: ['.ts', '.tsx', '.js', '.mjs', '.cjs', '.json'],
    },
    skipAnalysisNotInRules: true,
    reporterOptions: { text: { highlightFocused: true } },
  },
};
