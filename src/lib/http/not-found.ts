/**
 * A page's 404: a response with no body, which Astro answers by rendering src/pages/404.astro (a 404 with a
 * body is sent as it is). Pages use it for unknown ids and for records of another crew alike, so the two
 * cannot be told apart. JSON endpoints answer jsonError(404, …) instead.
 */
export function notFoundPage(): Response {
  return new Response(null, { status: 404 });
}

/**
 * The not-found page from a JSON endpoint answering a plain HTML form (Astro renders 404.astro only for
 * pages): a GET rewrite to /404, since the form's body has been read and cannot be passed on.
 */
export function rewriteToNotFoundPage(context: {
  url: URL;
  request: Request;
  rewrite: (to: Request) => Promise<Response>;
}): Promise<Response> {
  return context.rewrite(
    new Request(new URL('/404', context.url), { method: 'GET', headers: context.request.headers }),
  );
}
