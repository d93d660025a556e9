/**
 * The security headers, in one place (OWASP ASVS 4.0 §14.4; MDN's header reference). The fixed
 * ones go on every answer through next.config.ts; the Content-Security-Policy needs a fresh nonce
 * for each page and is set by proxy.ts, which Next reads to put the nonce on its own scripts.
 */

export const FIXED_HEADERS: { key: string; value: string }[] = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "same-origin" },
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Cross-Origin-Opener-Policy", value: "same-origin" },
  {
    key: "Permissions-Policy",
    value:
      "camera=(), microphone=(), geolocation=(), payment=(), usb=(), serial=(), bluetooth=(), midi=(), accelerometer=(), gyroscope=(), magnetometer=()",
  },
];

/** One year, the value hstspreload.org asks for; sent only on answers served over HTTPS. */
export const HSTS = "max-age=31536000; includeSubDomains";

/**
 * Scripts run only with this request's nonce ('strict-dynamic' lets Next's own loader add its
 * chunks). Styles allow inline style attributes, which React's style props and the charts write
 * and which a nonce cannot cover; no inline script is allowed. Nothing may frame the app.
 */
export function contentSecurityPolicy(
  nonce: string,
  options: { https: boolean; development: boolean },
): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${options.development ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(options.https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}
