/** Component tests for the web client (run: npx jest -c jest.client.config.js). */
module.exports = {
  displayName: 'client',
  preset: 'jest-expo/web',
  rootDir: __dirname,
  testMatch: ['<rootDir>/tests/client/**/*.test.tsx'],
  moduleNameMapper: {
    '^@/(.*)$': '<rootDir>/$1',
  },
  clearMocks: true,
};
