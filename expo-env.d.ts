/// <reference types="expo/types" />

// Expo type references (asset imports, process.env.EXPO_PUBLIC_*). Kept in the repository because tsconfig includes it.
