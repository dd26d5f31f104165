// Response headers that every page and API answer carries, and the same-origin rule for
// requests that change something. Pure functions: proxy.ts applies them, tests read them.

/** A fresh, unguessable nonce for one page response's inline scripts. */
export function newNonce(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  let s = "";
  for (const b of bytes) s += String.fromCharCode(b);
  return btoa(s);
}

/**
 * The content security policy of a page. Scripts only from this origin or inline with this
 * response's nonce; the audio worklet, the analysis worker and the bench's offline worker are
 * files of this origin; recordings and photos play from this origin or from blob: URLs made in
 * the page. No framing by anyone (frame-ancestors 'none'), no plugins, forms post only here.
 * Development adds 'unsafe-eval', which React's dev build needs for its stack traces.
 */
export function pagePolicy(nonce: string, dev = false): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'${dev ? " 'unsafe-eval'" : ""}`,
    // React style attributes, uPlot and wavesurfer.js set inline styles.
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' blob: data:",
    "media-src 'self' blob:",
    "font-src 'self'",
    `connect-src 'self'${dev ? " ws: wss:" : ""}`,
    "worker-src 'self' blob:",
    "manifest-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}

/** API answers are data, never documents: nothing may run or be framed from them. */
export const API_POLICY = "default-src 'none'; frame-ancestors 'none'";

/** Headers for every response besides the content security policy. */
export const COMMON_HEADERS: Readonly<Record<string, string>> = {
  "Referrer-Policy": "same-origin",
  "X-Content-Type-Options": "nosniff",
  // For browsers that predate frame-ancestors.
  "X-Frame-Options": "DENY",
  // The bench needs the microphone and the camera for seat photos, on this origin only.
  "Permissions-Policy": "microphone=(self), camera=(self), geolocation=(), payment=(), usb=()",
  "Cross-Origin-Opener-Policy": "same-origin",
};

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

export function isMutating(method: string): boolean {
  return !SAFE_METHODS.has(method.toUpperCase());
}

export interface OriginInput {
  method: string;
  origin: string | null;
  referer: string | null;
  /** Host header(s) the request arrived with: the Host, and X-Forwarded-Host behind a proxy. */
  hosts: (string | null)[];
  /** Extra origins allowed, e.g. NEXTAUTH_URL's origin. */
  allowedOrigins?: string[];
}

export type OriginVerdict = { ok: true } | { ok: false; message: string };

function hostOf(value: string): string | null {
  try {
    return new URL(value).host.toLowerCase();
  } catch {
    return null;
  }
}

/**
 * A request that changes something must say it came from one of our own pages: its Origin (or,
 * where a browser sends none, its Referer) must name the host it was sent to. Cross-site forms
 * and scripts cannot forge these headers, so this stops request forgery on every route handler;
 * server actions get the same check from Next.js itself.
 */
export function checkOrigin(input: OriginInput): OriginVerdict {
  if (!isMutating(input.method)) return { ok: true };
  const hosts = new Set(
    input.hosts
      .flatMap((h) => (h ? h.split(",") : []))
      .map((h) => h.trim().toLowerCase())
      .filter(Boolean),
  );
  for (const o of input.allowedOrigins ?? []) {
    const h = hostOf(o);
    if (h) hosts.add(h);
  }
  const claimed = input.origin && input.origin !== "null" ? input.origin : input.referer;
  if (!claimed) {
    return {
      ok: false,
      message: "This request did not say which page sent it (no Origin header). Changes are taken only from Grindfade's own pages.",
    };
  }
  const host = hostOf(claimed);
  if (!host || !hosts.has(host)) {
    return {
      ok: false,
      message: `Changes are taken only from Grindfade's own pages; this request came from ${host ?? "an unreadable origin"}.`,
    };
  }
  return { ok: true };
}

/**
 * checkOrigin for a request as it arrived: its own Origin, Referer and Host headers (and
 * X-Forwarded-Host behind a proxy), with NEXTAUTH_URL's origin also allowed. proxy.ts and the
 * production server's stroke path both ask this.
 */
export function checkRequestOrigin(method: string, headers: Pick<Headers, "get">): OriginVerdict {
  const url = process.env.NEXTAUTH_URL;
  return checkOrigin({
    method,
    origin: headers.get("origin"),
    referer: headers.get("referer"),
    hosts: [headers.get("host"), headers.get("x-forwarded-host")],
    allowedOrigins: url ? [url] : [],
  });
}
