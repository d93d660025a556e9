// Stand-in for the "server-only" package in tests: the real one throws outside React Server
// Components, which is exactly where vitest runs the server modules.
export {};
