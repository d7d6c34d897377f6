import { defineConfig } from 'vitest/config';

// Unit, reference and property tests only; the Playwright specs in tests/e2e run apart.
export default defineConfig({
  test: {
    include: ['tests/unit/**/*.test.ts', 'tests/reference/**/*.test.ts', 'tests/property/**/*.test.ts'],
  },
});
