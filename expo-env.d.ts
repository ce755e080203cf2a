// Ambient types for Expo (asset imports, process.env.EXPO_PUBLIC_*) in the client's tsconfig.
/// <reference types="expo/types" />
