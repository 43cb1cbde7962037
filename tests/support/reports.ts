import type { ApiClient } from './api'

// Survey-report helpers for the e2e tests: a survey taken through to "reviewed", and waiting for a report.

/** Plans a survey of the given sites, runs it as the thermographer (each asset checked clear), submits and reviews it. */
export async function reviewedSurvey(
  manager: ApiClient,
  thermographer: ApiClient,
  slug: string,
  plan: { thermographerId: string; instrumentId: string; siteIds: string[]; plannedFor?: string },
  record: (surveyId: string) => Promise<void> = async () => {},
): Promise<string> {
  const base = `/api/orgs/${slug}/surveys`
  const planned = await manager.post(base, { plannedFor: plan.plannedFor ?? '2026-12-01', thermographerId: plan.thermographerId, instrumentId: plan.instrumentId, siteIds: plan.siteIds })
  if (planned.status !== 201) throw new Error(`plan: ${planned.status} ${JSON.stringify(planned.body)}`)
  const id = planned.body.id as string
  const started = await thermographer.post(`${base}/${id}/start`, { version: planned.body.version })
  if (started.status !== 200) throw new Error(`start: ${started.status} ${JSON.stringify(started.body)}`)
  await record(id)
  let detail = (await thermographer.get(`${base}/${id}`)).body
  for (const site of detail.sites) {
    for (const asset of site.assets) {
      if (!asset.check) await thermographer.post(`${base}/${id}/checks`, { assetId: asset.id, outcome: 'clear' })
    }
  }
  detail = (await thermographer.get(`${base}/${id}`)).body
  const submitted = await thermographer.post(`${base}/${id}/submit`, { version: detail.version })
  if (submitted.status !== 200) throw new Error(`submit: ${submitted.status} ${JSON.stringify(submitted.body)}`)
  const reviewed = await manager.post(`${base}/${id}/review`, { decision: 'reviewed', comments: '', version: submitted.body.version })
  if (reviewed.status !== 200) throw new Error(`review: ${reviewed.status} ${JSON.stringify(reviewed.body)}`)
  return id
}

/** Polls a report until it is ready or failed (the worker runs in the app); returns the last answer and the states seen. */
export async function waitForReport(client: ApiClient, slug: string, reportId: string, timeoutMs = 60_000) {
  const seen: Array<{ state: string; progress: number }> = []
  const until = Date.now() + timeoutMs
  for (;;) {
    const res = await client.get(`/api/orgs/${slug}/reports/${reportId}`)
    if (res.status !== 200) throw new Error(`report: ${res.status} ${JSON.stringify(res.body)}`)
    seen.push({ state: res.body.state, progress: res.body.progress })
    if (res.body.state === 'ready' || res.body.state === 'failed') return { report: res.body, seen }
    if (Date.now() > until) throw new Error(`report still ${res.body.state} after ${timeoutMs} ms`)
    await new Promise((r) => setTimeout(r, 150))
  }
}
