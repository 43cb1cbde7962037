import { z } from 'zod'

// The content security policy allows no eval. zod compiles object parsers with `new Function` unless told not to,
// and merely probing for it is reported as a policy violation, so the browser's zod runs without it. Set at module
// load, before any page chunk builds its schemas (zod decides when a schema is created).
z.config({ jitless: true })

export default defineNuxtPlugin(() => {})
