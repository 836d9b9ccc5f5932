// GET|POST|PUT|PATCH|DELETE /api/v1/* – any route not defined above: a JSON 404
const notFound = (req: Request) =>
  Response.json({ error: { code: "not_found", message: `no API route ${req.method} ${new URL(req.url).pathname}` } }, { status: 404 });

export { notFound as GET, notFound as POST, notFound as PUT, notFound as PATCH, notFound as DELETE };
