// shpjs's CommonJS build (which `require` picks, e.g. under tsx in scripts) reads the browser global `self`
// when it loads; Node has none. Imported before shpjs so that it finds one.
const g = globalThis as { self?: unknown };
g.self ??= globalThis;
export {};
