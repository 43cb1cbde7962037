// Loads the invented demo scenario (idempotent: a second run changes nothing).
import { connect } from '../db/migrator'
import { seedDemo, DEMO_ORG } from '../db/seeds/demo'

const url = process.env.NUXT_DATABASE_URL
if (!url) {
  console.error('NUXT_DATABASE_URL is not set.')
  process.exit(1)
}
const db = connect(url, 1)
try {
  const created = await seedDemo(db as never)
  console.log(created ? `Demo data loaded: ${DEMO_ORG.name}.` : 'Demo data already present.')
} finally {
  await db.destroy()
}
