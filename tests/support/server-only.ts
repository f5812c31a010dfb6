// Tests import server modules directly; the real "server-only" guard throws outside React's
// server environment, so vitest resolves it to this empty module.
export {};
