// One Jest run with a project per layer. Shared and server code are compiled by Babel's
// TypeScript preset (allowDeclareFields for Sequelize's `declare` fields), not the Expo preset.
const nodeTransform = {
  '^.+\\.[jt]sx?$': [
    'babel-jest',
    {
      configFile: false,
      babelrc: false,
      presets: [['@babel/preset-typescript', { allowDeclareFields: true }]],
      plugins: ['@babel/plugin-transform-modules-commonjs'],
    },
  ],
};

const nodeProject = (name, roots) => ({
  displayName: name,
  testEnvironment: 'node',
  roots,
  testMatch: ['**/*.test.ts'],
  transform: nodeTransform,
  moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
});

module.exports = {
  testTimeout: 30000,
  projects: [
    nodeProject('shared', ['<rootDir>/tests/shared']),
    nodeProject('server', ['<rootDir>/tests/server']),
    ...(require('fs').existsSync(__dirname + '/jest.client.config.js') ? [require('./jest.client.config.js')] : []),
    { ...nodeProject('e2e', ['<rootDir>/tests/e2e']) },
  ],
};
