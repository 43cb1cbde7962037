// Shapes of the JSON the account and organisation routes answer, as the client receives them (dates are ISO strings).
import type { Role } from '../permissions'

export type TemperatureUnit = 'C' | 'F'
export type LengthUnit = 'm' | 'ft'

/** One organisation the signed-in person belongs to. */
export interface MyOrganisation {
  slug: string
  name: string
  role: Role
}

/** GET /api/account/me */
export interface Profile {
  id: string
  email: string
  name: string
  temperatureUnit: TemperatureUnit
  lengthUnit: LengthUnit
  timeZone: string
  organisations: MyOrganisation[]
}

/** GET /api/orgs/:org */
export interface OrganisationSummary {
  slug: string
  name: string
  myRole: Role
  loadExponent: number
  timeZone: string
  version: number
  createdAt: string
  counts: { sites: number; assets: number }
  /** Schedule intervals and trip-estimate settings. */
  programme: {
    roadFactor: number
    averageSpeedKmh: number
    intervalMonthsNormal: number
    intervalMonthsCondition3: number
    monitorBands: number[]
    monitorFactor: number
  }
}

/** GET /api/orgs/:org/members */
export interface MemberItem {
  userId: string
  name: string
  email: string
  role: Role
  since: string
  /** Thermography qualification as the organisation records it (printed on survey reports); '' when none. */
  qualification: string
}

/** GET /api/orgs/:org/invitations */
export interface InvitationItem {
  id: string
  email: string
  role: Role
  status: 'pending' | 'accepted' | 'revoked'
  expiresAt: string
  expired: boolean
  sentCount: number
  lastSentAt: string
  createdAt: string
}

/** GET /api/invitations/:token */
export interface InvitationPreview {
  organisationName: string
  email: string
  role: Role
  expiresAt: string
  hasAccount: boolean
}

/** GET /api/dev/mail */
export interface DevMail {
  id: string
  from: string
  to: string[] | string
  subject: string
  text: string
  html: string
  date: string
}
