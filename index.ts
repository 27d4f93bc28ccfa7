// The app's entry: Expo Router's own (`expo-router/entry`), started once the bundle's modules are initialised in
// short slices (src/web/warm-up.ts). Its runtime set-up comes first, as Expo Router requires.
import '@expo/metro-runtime';
import { warmUp } from './src/web/warm-up';

// The development server's pages ask to be hydrated; the app renders over the snapshot instead, as in production
// (the exported pages carry no such flag: server/web-build.ts).
delete (globalThis as { __EXPO_ROUTER_HYDRATE__?: unknown }).__EXPO_ROUTER_HYDRATE__;

const entry = new Set([require.resolveWeak('expo-router/entry'), require.resolveWeak('expo-router/entry-classic')]);
warmUp(entry).then(() => require('expo-router/entry'));
