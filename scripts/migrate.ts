// Applies pending migrations to the database named by NUXT_DATABASE_URL.
import { connect, migrateToLatest } from '../db/migrator'

const url = process.env.NUXT_DATABASE_URL
if (!url) {
  console.error('NUXT_DATABASE_URL is not set (run through scripts/start.sh, or source .data/dev/services.env).')
  process.exit(1)
}
const db = connect(url, 1)
try {
  const applied = await migrateToLatest(db)
  console.log(applied.length ? `Applied migrations: ${applied.join(', ')}` : 'Database is up to date.')
} finally {
  await db.destroy()
}
