import { getToken } from "next-auth/jwt";
import { NextResponse, type NextRequest } from "next/server";

// A convenience only: signed-out visitors to private areas go straight to
// sign-in. Every page and route still checks on the server through
// lib/auth/guard.ts, which reads role and plan from the database. The proxy
// also records the requested path for requirePageViewer's callbackUrl.
// API routes are not matched: the proxy would buffer their bodies.

const PRIVATE_PREFIXES = ["/account", "/admin", "/jobs", "/organizations"];

export async function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  if (PRIVATE_PREFIXES.some((p) => pathname === p || pathname.startsWith(`${p}/`))) {
    const token = await getToken({ req, secret: process.env.NEXTAUTH_SECRET });
    if (!token) {
      const url = req.nextUrl.clone();
      url.pathname = "/sign-in";
      url.search = `?callbackUrl=${encodeURIComponent(pathname + search)}`;
      return NextResponse.redirect(url);
    }
  }
  const headers = new Headers(req.headers);
  headers.set("x-rainprint-path", pathname + search);
  return NextResponse.next({ request: { headers } });
}

export const config = {
  matcher: ["/((?!api/|_next/|favicon.ico).*)"],
};
