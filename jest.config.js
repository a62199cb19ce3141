// One runner for every tier; each tier is a Jest project so `npm test` ends with one summary line.
const tsJest = ['ts-jest', { tsconfig: 'tsconfig.json', diagnostics: false }];
const common = {
  testEnvironment: 'node',
  transform: { '^.+\\.tsx?$': tsJest },
  moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
  moduleFileExtensions: ['ts', 'tsx', 'js', 'json'],
};
module.exports = {
  projects: [
    { ...common, displayName: 'unit', testMatch: ['<rootDir>/tests/unit/**/*.test.ts'] },
    { ...common, displayName: 'api', testMatch: ['<rootDir>/tests/api/**/*.test.ts'], testTimeout: 60000 },
    { ...common, displayName: 'browser', testMatch: ['<rootDir>/tests/browser/**/*.test.ts'], testTimeout: 240000 },
  ],
};
