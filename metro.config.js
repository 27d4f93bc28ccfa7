// Development only: Metro serves the app on :8081 and would answer /api/* with its HTML shell,
// so /api/* is forwarded to the Express server (API_PORT, default 8080).
const { getDefaultConfig } = require('expo/metro-config');
const http = require('node:http');

const config = getDefaultConfig(__dirname);
// The shipped fonts are WOFF2 subsets (npm run fonts).
config.resolver.assetExts.push('woff2');
// Modules run when first used instead of all at start-up: the first screen needs a fraction of the bundle.
config.transformer.getTransformOptions = async () => ({
  transform: { experimentalImportSupport: true, inlineRequires: true },
});
const apiPort = Number(process.env.API_PORT || 8080);

config.server = config.server || {};
config.server.enhanceMiddleware = (middleware) => (req, res, next) => {
  if (!req.url || !req.url.startsWith('/api/')) return middleware(req, res, next);
  const upstream = http.request({ host: '127.0.0.1', port: apiPort, path: req.url, method: req.method, headers: req.headers }, (up) => {
    res.writeHead(up.statusCode || 502, up.headers);
    up.pipe(res);
  });
  upstream.on('error', () => {
    res.statusCode = 502;
    res.setHeader('content-type', 'application/json');
    res.end(JSON.stringify({ error: { code: 'api_unreachable', message: `API server not reachable on port ${apiPort}` } }));
  });
  req.pipe(upstream);
};

module.exports = config;
