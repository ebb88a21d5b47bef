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

const nodeProject = (name, dir) => ({
  displayName: name,
  testEnvironment: 'node',
  rootDir: __dirname,
  testMatch: [`<rootDir>/${dir}/**/*.test.ts`],
  transform: nodeTransform,
  moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
});

module.exports = {
  testTimeout: 30000,
  projects: [
    nodeProject('shared', 'tests/shared'),
    nodeProject('server', 'tests/server'),
    require('./jest.client.config.js'),
    nodeProject('fault', 'tests/fault'),
    nodeProject('e2e', 'tests/e2e'),
  ],
};
