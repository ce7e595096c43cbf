/**
 * GET /api/openapi.json: an OpenAPI 3.1 document generated from the route table (every declared
 * route, its summary and who may call it) with the two JSON Schemas embedded as components: the
 * entry document (schemas/entry.schema.json) and the challenge spec (schemas/challenge.schema.json).
 */
import { readFileSync } from 'node:fs';
import type { AppContext } from '../context';
import type { RouteDef, RouteTable } from './registry';

const readSchema = (name: string) => {
  const s = JSON.parse(readFileSync(new URL(`../../schemas/${name}`, import.meta.url), 'utf8')) as Record<string, unknown>;
  return s;
};

const ACCESS_NOTE: Record<RouteDef['access'], string> = {
  public: 'Anyone, without signing in.',
  'signed-in': 'A signed-in user (session cookie).',
  verified: 'A signed-in user whose e-mail address is confirmed.',
  'team-member': "A member of the route's team",
  'team-lead': "A lead of the route's team.",
  moderator: 'A moderator or an administrator.',
  admin: 'An administrator.',
};

/** Which component schema a route's body is, when it takes one of the two documents. */
function bodyRef(def: RouteDef): string | null {
  if (def.method === 'post' && (def.path === '/challenges/:slug/entries' || def.path === '/entries/validate')) return 'Entry';
  if (def.method === 'put' && def.path === '/entries/:entryId') return 'Entry';
  if (def.method === 'post' && (def.path === '/challenges' || def.path === '/challenges/preview')) return 'Challenge';
  return null;
}

export function buildOpenApi(defs: readonly RouteDef[], baseUrl: string) {
  const paths: Record<string, Record<string, unknown>> = {};
  for (const d of defs) {
    const p = '/api' + d.path.replace(/:([A-Za-z0-9_]+)/g, '{$1}');
    const params: Record<string, unknown>[] = [...d.path.matchAll(/:([A-Za-z0-9_]+)/g)].map((m) => ({ name: m[1], in: 'path', required: true, schema: { type: 'string' } }));
    if (d.method === 'post' && d.path === '/challenges/:slug/entries') {
      params.push({ name: 'Idempotency-Key', in: 'header', required: false, schema: { type: 'string', maxLength: 200 }, description: 'A retry with the same key and body returns the entry already stored (200); the same key with another body is refused (409)' });
    }
    if (bodyRef(d) === 'Entry' && d.path !== '/entries/validate') {
      params.push({ name: 'incomplete', in: 'query', required: false, schema: { enum: ['1'] }, description: 'Store a draft even when the document has problems (listed with the draft); it cannot be submitted until a valid document replaces it' });
    }
    const security = d.access === 'public' ? [] : d.apiKey ? [{ session: [] }, { apiKey: [] }] : [{ session: [] }];
    const access = ACCESS_NOTE[d.access] + (d.access === 'team-member' ? (d.apiKey ? ", or the team's API key in x-api-key." : '.') : '');
    const op: Record<string, unknown> = {
      summary: d.summary,
      description: `Who may call it: ${access}`,
      'x-access': d.access,
      parameters: params,
      security,
      responses: {
        '2XX': { description: 'Success (JSON)' },
        '4XX': { description: 'An error: {"error": {"code", "message", "problems": [{"path": JSON pointer, "message"}], "requestId"}}', content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } },
      },
    };
    const ref = bodyRef(d);
    if (ref) {
      op.requestBody = {
        required: true,
        content: {
          'application/json': { schema: { $ref: `#/components/schemas/${ref}` } },
          'multipart/form-data': { schema: { type: 'object', required: ['file'], properties: { file: { type: 'string', format: 'binary', description: `a JSON file following the ${ref} schema` } } } },
        },
      };
    } else if (d.method !== 'get' && d.method !== 'delete') {
      op.requestBody = { required: false, content: { 'application/json': { schema: { type: 'object' } } } };
    }
    (paths[p] ??= {})[d.method] = op;
  }
  return {
    openapi: '3.1.0',
    info: { title: 'Parallax API', version: '1', description: 'Versioned quantum-circuit challenges, entries with uncertainties, exact references and standings. Errors name the field (JSON pointer) and the fix.' },
    servers: [{ url: baseUrl }],
    paths,
    components: {
      securitySchemes: {
        session: { type: 'apiKey', in: 'cookie', name: 'better-auth.session_token', description: 'The session cookie from POST /api/auth/sign-in/email' },
        apiKey: { type: 'apiKey', in: 'header', name: 'x-api-key', description: 'A team API key (POST /api/teams/{teamId}/api-keys); it authorises the entry routes of its team only' },
      },
      schemas: {
        Entry: readSchema('entry.schema.json'),
        Challenge: readSchema('challenge.schema.json'),
        Error: {
          type: 'object', required: ['error'],
          properties: { error: { type: 'object', required: ['code', 'message'], properties: {
            code: { type: 'string' }, message: { type: 'string' }, requestId: { type: 'string' },
            problems: { type: 'array', items: { type: 'object', required: ['path', 'message'], properties: { path: { type: 'string', description: 'JSON pointer (RFC 6901) of the field' }, message: { type: 'string' } } } },
          } } },
        },
      },
    },
  };
}

export function registerOpenApiRoutes(routes: RouteTable, ctx: AppContext): void {
  let cached: unknown = null;
  routes.add({
    method: 'get', path: '/openapi.json', access: 'public', summary: 'This API as an OpenAPI 3.1 document, with the entry and challenge JSON Schemas',
    handler: () => (cached ??= buildOpenApi(routes.defs, ctx.config.baseUrl)),
  });
}
