// One runner for every tier; each tier is a Jest project so `npm test` ends with one summary line.
const tsJest = ['ts-jest', { tsconfig: 'tsconfig.json', diagnostics: false }];
const common = {
  testEnvironment: 'node',
  transform: { '^.+\\.tsx?$': tsJest },
  moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
  moduleFileExtensions: ['ts', 'tsx', 'js', 'json'],
};
module.exports = {
  // Jest 30 reads testTimeout from the top level only; browser and API tests need long ones.
  testTimeout: 240000,
  projects: [
    { ...common, displayName: 'unit', testMatch: ['<rootDir>/tests/unit/**/*.test.ts'] },
    { ...common, displayName: 'api', testMatch: ['<rootDir>/tests/api/**/*.test.ts'] },
    { ...common, displayName: 'browser', testMatch: ['<rootDir>/tests/browser/**/*.test.ts'] },
  ],
};
