/**
 * Three jest projects: pure unit tests (shared/ domain code, server helpers), client component
 * tests under jest-expo, and server integration tests against the real PostgreSQL started by
 * scripts/test.sh. End-to-end tests run in Playwright, not here.
 */
const tsJest = ['ts-jest', { tsconfig: '<rootDir>/server/tsconfig.json' }];

module.exports = {
  testTimeout: 30000,
  projects: [
    {
      displayName: 'unit',
      testEnvironment: 'node',
      roots: ['<rootDir>/tests/unit'],
      transform: { '^.+\\.ts$': tsJest },
      moduleFileExtensions: ['ts', 'js', 'json'],
    },
    {
      displayName: 'client',
      preset: 'jest-expo/web',
      roots: ['<rootDir>/tests/client'],
      setupFiles: ['<rootDir>/tests/client/setup.ts'],
      // The chart libraries (d3-scale, d3-shape and theirs) resolve to ES modules (.mjs), which
      // jest's CommonJS runtime cannot load: it reads their UMD builds (dist/<name>.js) instead.
      moduleNameMapper: { '^(d3-[a-z-]+|internmap)$': '<rootDir>/node_modules/$1/dist/$1.js' },
    },
    {
      displayName: 'server',
      testEnvironment: 'node',
      roots: ['<rootDir>/tests/integration'],
      transform: { '^.+\\.ts$': tsJest },
      moduleFileExtensions: ['ts', 'js', 'json'],
      setupFiles: ['<rootDir>/tests/integration/env.ts'],
      globalSetup: '<rootDir>/tests/integration/global-setup.ts',
    },
  ],
};
