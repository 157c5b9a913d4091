import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

const root = fileURLToPath(new URL('.', import.meta.url));
// The suite runs where local time is far from UTC (UTC+12:45/+13:45), so a time read as local
// instead of UTC fails it; `npm test` also runs the unit and API tests under UTC. A plain
// `npx vitest` gets the same zone.
process.env.TZ ||= 'Pacific/Chatham';
const alias = { '@': root };

export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' },
      },
      {
        resolve: { alias },
        test: {
          name: 'api',
          include: ['tests/api/**/*.test.ts'],
          environment: 'node',
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/e2e/global-setup.ts'],
          testTimeout: 120_000,
          hookTimeout: 600_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
