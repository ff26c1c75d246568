// GET /api/studios/:studioId/shows/:showId/turnover?approval=internal|client[&format=zip] → what a turnover to
// editorial contains (JSON), or the ZIP itself, streamed: CMX 3600 EDL + the MP4 exports of the versions approved by us
// (internal) or signed off by the client (client) + contents.txt (supervisor).
import { endpoint, json, idParam, readQuery } from '~/lib/server/http';
import { requireRole } from '~/lib/server/authz';
import { turnoverPlan, turnoverZip } from '~/lib/server/turnover';
import { turnoverQuery } from '~/lib/library/turnover';

export const GET = endpoint(async ({ params, locals, url }) => {
  const access = await requireRole(locals, idParam(params, 'studioId'), 'supervisor');
  const showId = idParam(params, 'showId');
  const query = readQuery(url, turnoverQuery);
  if (query.format === 'json') return json({ turnover: await turnoverPlan(access, showId, query.approval) });
  // Streamed as it is written (no content-length): the MP4s pass through from the store one after another.
  const zip = await turnoverZip(access, showId, query.approval);
  return new Response(zip.stream, {
    status: 200,
    headers: {
      'content-type': 'application/zip',
      'content-disposition': `attachment; filename="${zip.fileName}"`,
      'cache-control': 'no-store',
    },
  });
});
