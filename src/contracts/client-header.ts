// A plain constant without zod, so the web app may import it. The server refuses writes without this header
// (server/middleware/csrf.ts): a cross-site form cannot set it, and a cross-site script would need a CORS preflight
// the server never grants.
export const CLIENT_HEADER = 'x-yieldpoint-client';
