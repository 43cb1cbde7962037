import { openApiDocument } from '#shared/openapi'

// The API description is public (it describes, it holds no data); every operation in it needs a token.
export default defineEventHandler((event) => {
  setResponseHeader(event, 'cache-control', 'public, max-age=300')
  return openApiDocument(getRequestURL(event).origin)
})
