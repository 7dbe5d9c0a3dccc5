/**
 * Security headers (helmet) with a Content Security Policy that fits the Vite-built Vue client:
 * scripts only from our origin, inline style attributes allowed (Element Plus and uPlot set
 * them), WebSockets to our own host, nothing fetched from elsewhere.
 */
import type { IncomingMessage } from 'node:http';
import helmet from 'helmet';
import type { RequestHandler } from 'express';

const HOST_PATTERN = /^[A-Za-z0-9.-]+(:\d{1,5})?$|^\[[0-9A-Fa-f:.]+\](:\d{1,5})?$/;

/** ws:/wss: to the host the page was loaded from ('self' alone does not cover ws: in every browser). */
function ownSockets(req: IncomingMessage): string {
  const host = req.headers.host ?? '';
  return HOST_PATTERN.test(host) ? `ws://${host} wss://${host}` : "'self'";
}

export function securityHeaders(https: boolean): RequestHandler {
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'"],
        scriptSrcAttr: ["'none'"],
        styleSrc: ["'self'", "'unsafe-inline'"],
        imgSrc: ["'self'", 'data:', 'blob:'],
        fontSrc: ["'self'", 'data:'],
        connectSrc: ["'self'", (req) => ownSockets(req)],
        workerSrc: ["'self'", 'blob:'],
        objectSrc: ["'none'"],
        baseUri: ["'self'"],
        formAction: ["'self'"],
        frameAncestors: ["'self'"],
        ...(https ? { upgradeInsecureRequests: [] } : {}),
      },
    },
    // HSTS only makes sense when the product is served over HTTPS.
    strictTransportSecurity: https ? { maxAge: 15_552_000, includeSubDomains: false } : false,
  }) as RequestHandler;
}
