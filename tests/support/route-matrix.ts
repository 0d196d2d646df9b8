import { Client, signedIn, startApi, type ApiHarness } from './api'
import { impactDone } from './impact'

export type Role = 'anon' | 'admin' | 'analyst' | 'expert' | 'reviewer' | 'outsider'
export const ROLES: Role[] = ['anon', 'outsider', 'reviewer', 'expert', 'analyst', 'admin']
const MEMBERS: Role[] = ['admin', 'analyst', 'expert', 'reviewer']
export type Rule = 'public' | 'signed-in' | Role[]

/**
 * Who may call each route. Membership roles are study roles in the fixture study; 'outsider' is a signed-in
 * expert account that is not a member. A route missing here fails the test, so every new route needs an entry.
 */
export const MATRIX: Record<string, Rule> = {
  'GET /api/health': 'public',
  'GET /api/config': 'public',
  'GET /api/auth/csrf': 'public',
  'POST /api/auth/sign-in': 'public',
  'POST /api/auth/sign-out': 'signed-in',
  'GET /api/auth/me': 'signed-in',
  'GET /api/users/directory': ['admin', 'analyst'],
  'GET /api/users': ['admin'],
  'POST /api/users': ['admin'],
  'PATCH /api/users/:id': ['admin'],
  'GET /api/studies': 'signed-in',
  'POST /api/studies': ['admin', 'analyst'],
  'GET /api/studies/:id': MEMBERS,
  'PATCH /api/studies/:id': ['admin', 'analyst'],
  'POST /api/studies/:id/members': ['admin', 'analyst'],
  'DELETE /api/studies/:id/members/:userId': ['admin', 'analyst'],
  'GET /api/studies/:id/audit': ['admin', 'analyst', 'reviewer'],
  'GET /api/invitations/:token': 'public',
  'POST /api/invitations/:token/accept': 'public',
  'GET /api/dev/mailbox': ['admin'],
  'GET /api/dev/mailbox/:id': ['admin'],
  'GET /api/studies/:id/quantities': MEMBERS,
  'POST /api/studies/:id/quantities': ['admin', 'analyst'],
  'GET /api/quantities/:id': MEMBERS,
  'PATCH /api/quantities/:id': ['admin', 'analyst'],
  'POST /api/quantities/:id/files': ['admin', 'analyst'],
  'GET /api/files/:id': MEMBERS,
  'DELETE /api/files/:id': ['admin', 'analyst'],
  'GET /api/studies/:id/calibration-questions': MEMBERS,
  'POST /api/studies/:id/calibration-questions': ['admin', 'analyst'],
  'PATCH /api/calibration-questions/:id': ['admin', 'analyst'],
  'GET /api/studies/:id/compositions': MEMBERS,
  'POST /api/studies/:id/compositions': ['admin', 'analyst'],
  'GET /api/compositions/:id': MEMBERS,
  'PATCH /api/compositions/:id': ['admin', 'analyst'],
  'GET /api/compositions/:id/dirichlet': ['admin', 'analyst', 'reviewer'],
  'GET /api/compositions/:id/datasets': ['admin', 'analyst', 'reviewer'],
  'POST /api/compositions/:id/datasets': ['admin', 'analyst'],
  'GET /api/compositions/:id/impact': ['admin', 'analyst', 'reviewer'],
  'POST /api/compositions/:id/impact': ['admin', 'analyst'],
  // Last of the composition routes: the analyst deletes the fixture's composition.
  'DELETE /api/compositions/:id': ['admin', 'analyst'],
  'GET /api/studies/:id/rounds': MEMBERS,
  'POST /api/studies/:id/rounds': ['admin', 'analyst'],
  'GET /api/my/rounds': 'signed-in',
  'GET /api/rounds/:id': MEMBERS,
  'PATCH /api/rounds/:id': ['admin', 'analyst'],
  'POST /api/rounds/:id/open': ['admin', 'analyst'],
  'POST /api/rounds/:id/close': ['admin', 'analyst'],
  'GET /api/rounds/:id/progress': ['admin', 'analyst', 'reviewer'],
  'POST /api/rounds/:id/invitations': ['admin', 'analyst'],
  'DELETE /api/rounds/:id/panel/:panelId': ['admin', 'analyst'],
  'POST /api/rounds/:id/panel/:panelId/resend': ['admin', 'analyst'],
  'POST /api/rounds/:id/panel/:panelId/revoke': ['admin', 'analyst'],
  'GET /api/rounds/:id/entry': ['expert'],
  'PUT /api/rounds/:id/declaration': ['expert'],
  'POST /api/rounds/:id/declaration/confirm': ['expert'],
  'POST /api/rounds/:id/practice': ['expert'],
  'GET /api/rounds/:id/judgements': MEMBERS,
  'PUT /api/rounds/:id/judgements/:quantityId': ['expert'],
  'POST /api/rounds/:id/submit': ['expert'],
  'POST /api/rounds/:id/reopen': ['admin', 'analyst'],
  'GET /api/judgements/:id/history': ['admin', 'analyst', 'reviewer', 'expert'],
  'GET /api/rounds/:id/calibration-answers': MEMBERS,
  'PUT /api/rounds/:id/calibration-answers/:questionId': ['expert'],
  'GET /api/rounds/:id/feedback': ['expert'],
  'POST /api/rounds/:id/links': ['admin', 'analyst'],
  'PUT /api/rounds/:id/links/order': ['admin', 'analyst'],
  'GET /api/links/:id': ['admin', 'analyst', 'reviewer'],
  'PATCH /api/links/:id': ['admin', 'analyst'],
  'DELETE /api/links/:id': ['admin', 'analyst'],
  'GET /api/rounds/:id/link-answers': MEMBERS,
  'PUT /api/rounds/:id/link-answers/:linkId': ['expert'],
  'GET /api/link-answers/:id/history': ['admin', 'analyst', 'reviewer', 'expert'],
  'GET /api/quantities/:id/reconciliation': ['admin', 'analyst', 'reviewer'],
  'GET /api/studies/:id/linked-quantities': ['admin', 'analyst', 'reviewer'],
  'PUT /api/links/:id/reconciliation': ['admin', 'analyst'],
  'GET /api/quantities/:id/joint-draws': ['admin', 'analyst', 'reviewer'],
  'PUT /api/quantities/:id/reconciliation': ['admin', 'analyst'],
  'GET /api/studies/:id/datasets': ['admin', 'analyst', 'reviewer'],
  'POST /api/studies/:id/datasets/preview': ['admin', 'analyst'],
  'POST /api/studies/:id/datasets': ['admin', 'analyst'],
  'GET /api/datasets/:id': ['admin', 'analyst', 'reviewer'],
  'POST /api/quantities/:id/impact': ['admin', 'analyst'],
  'GET /api/quantities/:id/impact': ['admin', 'analyst', 'reviewer'],
  'GET /api/impact-jobs/:id': ['admin', 'analyst', 'reviewer'],
  'POST /api/impact-jobs/:id/cancel': ['admin', 'analyst'],
  'GET /api/quantities/:id/impact-jobs/active': ['admin', 'analyst', 'reviewer'],
  'PUT /api/quantities/:id/impact/not-run': ['admin', 'analyst'],
  'GET /api/studies/:id/record': ['admin', 'analyst', 'reviewer'],
  'GET /api/studies/:id/record.json': ['admin', 'analyst', 'reviewer'],
  'GET /api/studies/:id/record.docx': ['admin', 'analyst', 'reviewer'],
  'PATCH /api/studies/:id/record': ['admin', 'analyst'],
  'POST /api/studies/:id/record/submit': ['admin', 'analyst'],
  'POST /api/studies/:id/record/return': ['reviewer'],
  'POST /api/studies/:id/record/sign-off': ['reviewer'],
  'POST /api/studies/:id/record/comments': ['admin', 'analyst', 'reviewer'],
  'POST /api/studies/:id/record/new-version': ['admin', 'analyst'],
  'POST /api/studies/:id/record/charts': ['admin', 'analyst'],
  'POST /api/studies/:id/record/exclusions': ['admin', 'analyst'],
  'DELETE /api/studies/:id/record/exclusions/:quantityId': ['admin', 'analyst'],
  'GET /api/studies/:id/outbox': ['admin', 'analyst'],
}

export interface MatrixFixture {
  h: ApiHarness
  clients: Record<Role, Client>
  params: Record<string, string>
}

/** A study with one of everything (quantity, file, calibration question, open round with a panel, judgement, dataset, impact analysis) and a client per role. */
export async function matrixFixture(): Promise<MatrixFixture> {
  const h = startApi()
  const params: Record<string, string> = {}
  const analyst = await signedIn(h, 'analyst@kestrel.example')
  const study = (await analyst.post('/api/studies', { title: 'Authorization matrix study', context: 'Fixture for the route × role matrix.' }).expect(201)).body
  const directory = (await analyst.get('/api/users/directory')).body as { id: number; email: string }[]
  const idOf = (email: string) => directory.find((u) => u.email === email)!.id
  await analyst.post(`/api/studies/${study.id}/members`, { userId: idOf('reviewer@kestrel.example'), studyRole: 'reviewer' }).expect(201)
  const quantity = (await analyst.post(`/api/studies/${study.id}/quantities`, { name: 'Flow', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in night flow after pressure management?', support: { kind: 'real' } }).expect(201)).body
  const shareQuestion = 'Of the households in the pilot area, what share would choose this option?'
  const shares = await Promise.all(['share_a', 'share_b'].map(async (symbol) =>
    (await analyst.post(`/api/studies/${study.id}/quantities`, { name: symbol, symbol, question: shareQuestion, support: { kind: 'proportion' } }).expect(201)).body.id as number))
  const composition = (await analyst.post(`/api/studies/${study.id}/compositions`, { name: 'Uptake', wording: 'How households split between the options.', quantityIds: shares }).expect(201)).body
  const calib = (await analyst.post(`/api/studies/${study.id}/calibration-questions`, { question: 'Night flow in KV-07 in March 2025?', unit: 'L/s', trueValue: 7.4 }).expect(201)).body
  const file = (await analyst.agent.post(`/api/quantities/${quantity.id}/files`).set('x-csrf-token', analyst.token).attach('file', Buffer.from('%PDF-1.4\n%%EOF\n'), 'e.pdf').expect(201)).body
  const round = (await analyst.post(`/api/studies/${study.id}/rounds`, {
    title: 'Matrix round', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 86400e3).toISOString(), items: [{ quantityId: quantity.id, method: 'quantile' }],
  }).expect(201)).body
  const withPanel = (await analyst.post(`/api/rounds/${round.id}/invitations`, { email: 'expert1@kestrel.example', name: 'Tomasz' }).expect(201)).body
  await analyst.post(`/api/rounds/${round.id}/open`).expect(200)
  // A second round holds a link (links are made while a round is a draft) and the expert's answer to it.
  const second = (await analyst.post(`/api/studies/${study.id}/quantities`, { name: 'Repair time', symbol: 'repair', unit: 'h', question: 'Median hours to repair a mains burst in 2026?', support: { kind: 'positive' } }).expect(201)).body
  const linkRound = (await analyst.post(`/api/studies/${study.id}/rounds`, {
    title: 'Matrix link round', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 86400e3).toISOString(),
    items: [{ quantityId: quantity.id, method: 'quantile' }, { quantityId: second.id, method: 'quantile' }],
  }).expect(201)).body
  const link = (await analyst.post(`/api/rounds/${linkRound.id}/links`, { firstQuantityId: quantity.id, secondQuantityId: second.id }).expect(201)).body
  await analyst.post(`/api/rounds/${linkRound.id}/invitations`, { email: 'expert1@kestrel.example', name: 'Tomasz' }).expect(201)
  await analyst.post(`/api/rounds/${linkRound.id}/open`).expect(200)
  const expert = await signedIn(h, 'expert1@kestrel.example')
  const linkAnswer = (await expert.put(`/api/rounds/${linkRound.id}/link-answers/${link.id}`, { probability: 0.7, rationale: '', version: 0 }).expect(200)).body
  const saved = (await expert.put(`/api/rounds/${round.id}/judgements/${quantity.id}`, { method: 'quantile', lower: 0, upper: 10, points: [], version: 0 }).expect(200)).body
  const dataset = (await analyst.agent.post(`/api/studies/${study.id}/datasets`).set('x-csrf-token', analyst.token)
    .field('quantityId', String(quantity.id)).field('name', 'Pilot').field('model', 'normal-known-sigma').field('valueColumn', 'v').field('sigma', '2')
    .attach('file', Buffer.from('v\n2.2\n3.5\n2.8\n'), 'p.csv').expect(201)).body
  // Done before the suites start, so that no worker writes to the tables while they compare them.
  const { job } = await impactDone(analyst, quantity.id, { datasetId: dataset.id, comparison: { family: 'normal', mu: 0, sigma: 10 } })
  Object.assign(params, {
    'studies/:id': String(study.id), 'quantities/:id': String(quantity.id), 'files/:id': String(file.id), 'rounds/:id': String(round.id),
    'calibration-questions/:id': String(calib.id), 'datasets/:id': String(dataset.id), 'compositions/:id': String(composition.id), 'judgements/:id': String(saved.judgement.id),
    'links/:id': String(link.id), 'link-answers/:id': String(linkAnswer.id), ':linkId': String(link.id),
    ':quantityId': String(quantity.id), ':questionId': String(calib.id), ':panelId': String(withPanel.panel[0].id),
    ':userId': String(idOf('expert3@kestrel.example')), 'users/:id': String(idOf('expert2@kestrel.example')), 'mailbox/:id': '1', ':token': 'x'.repeat(43), 'impact-jobs/:id': String(job!.id),
  })
  const anon = new Client(h)
  await anon.csrf()
  const clients: Record<Role, Client> = {
    anon, analyst, expert,
    admin: await signedIn(h, 'admin@kestrel.example'),
    reviewer: await signedIn(h, 'reviewer@kestrel.example'),
    outsider: await signedIn(h, 'expert3@kestrel.example'),
  }
  return { h, clients, params }
}

/** A route path with the fixture's ids filled in. */
export function fill(path: string, params: Record<string, string>): string {
  let out = path
  for (const [k, v] of Object.entries(params)) {
    if (k.startsWith(':')) out = out.replace(k, v)
    else out = out.replace(k, k.replace(/:id$/, v))
  }
  return out
}

/** One request with a body for writes. */
export function send(c: Client, method: string, url: string, body: object = {}) {
  switch (method) {
    case 'GET': return c.get(url)
    case 'POST': return c.post(url, body)
    case 'PUT': return c.put(url, body)
    case 'PATCH': return c.patch(url, body)
    case 'DELETE': return c.delete(url)
    default: throw new Error(method)
  }
}

