/**
 * Metro for the web export and the dev loop. The dev loop (`npm run dev:web`) forwards /api/* to the Express server on
 * QUASILEVEL_API_PORT (default 8080) so the app always calls relative /api URLs.
 */
const http = require('node:http');
const { getDefaultConfig } = require('expo/metro-config');

const config = getDefaultConfig(__dirname);

// On the web, zod's namespace of every message language becomes English alone (see the shim).
const path = require('node:path');
const ZOD_LOCALES_SHIM = path.join(__dirname, 'scripts', 'web-shims', 'zod-locales.js');
const resolveRequest = config.resolver.resolveRequest;
config.resolver.resolveRequest = (context, moduleName, platform) => {
  if (platform === 'web' && /^\.\.\/locales\/index\.js$/.test(moduleName) && /[\\/]node_modules[\\/]zod[\\/]v4[\\/](classic|core)[\\/]/.test(context.originModulePath)) {
    return { type: 'sourceFile', filePath: ZOD_LOCALES_SHIM };
  }
  return resolveRequest ? resolveRequest(context, moduleName, platform) : context.resolveRequest(context, moduleName, platform);
};
const apiPort = Number(process.env.QUASILEVEL_API_PORT || 8080);

config.server = {
  ...config.server,
  enhanceMiddleware: (middleware) => (req, res, next) => {
    if (!req.url || !req.url.startsWith('/api/')) return middleware(req, res, next);
    const upstream = http.request(
      { host: '127.0.0.1', port: apiPort, path: req.url, method: req.method, headers: req.headers },
      (up) => {
        res.writeHead(up.statusCode || 502, up.headers);
        up.pipe(res);
      },
    );
    upstream.on('error', () => {
      res.writeHead(502, { 'content-type': 'application/json' });
      res.end(JSON.stringify({ code: 'api_unreachable', message: `The API on port ${apiPort} is not running.` }));
    });
    req.pipe(upstream);
  },
};

module.exports = config;
