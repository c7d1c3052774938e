// `server-only` throws when imported outside React's server condition; tests are server code.
export {};
