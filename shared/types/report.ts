import type { ReportState } from '../report'

/** A survey report as the API returns it. */
export interface SurveyReportItem {
  id: string
  surveyId: string
  state: ReportState
  /** 0..100. */
  progress: number
  includeImages: boolean
  sizeBytes: number | null
  pageCount: number | null
  findingCount: number | null
  imageCount: number | null
  error: string | null
  requestedBy: { id: string; name: string } | null
  createdAt: string
  startedAt: string | null
  finishedAt: string | null
  fileName: string
  /** API path that answers a browser with a redirect to the file, and a JSON client with `{ url }`; null until ready. */
  downloadPath: string | null
}

export interface SurveyReportDownload {
  url: string
  fileName: string
  expiresInSeconds: number
}
