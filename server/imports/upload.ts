// Multipart uploads of one file (multer, kept in memory): size and count limits, and
// multer's errors turned into HttpErrors with a sentence (413 too large, 400 otherwise).
import type { RequestHandler } from 'express'
import multer from 'multer'
import { HttpError, badRequest } from '../http/errors.ts'

export const MB = 1024 * 1024

const formatMb = (bytes: number) => `${Math.round((bytes / MB) * 10) / 10} MB`

/**
 * Accepts one file in the multipart field `field` (at most `maxBytes`) and a few text fields.
 * The file lands in req.file (buffer, originalname); the text fields in req.body. `what`
 * names the file in the 413 sentence ("The elevation model file is larger than 64 MB.").
 */
export function singleFileUpload(field: string, maxBytes: number, what = 'file'): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: maxBytes, files: 1, fields: 20, fieldSize: 256 * 1024, parts: 25 },
  }).single(field)
  return (req, res, next) => {
    upload(req, res, (err: unknown) => {
      if (!err) return next()
      if (err instanceof multer.MulterError) {
        switch (err.code) {
          case 'LIMIT_FILE_SIZE':
            return next(new HttpError(413, 'payload_too_large', `The ${what} is larger than ${formatMb(maxBytes)}.`, { [field]: `At most ${formatMb(maxBytes)}.` }))
          case 'LIMIT_UNEXPECTED_FILE':
          case 'LIMIT_FILE_COUNT':
            return next(badRequest(`Send one file, in the form field "${field}".`, { [field]: `Send one file, in the form field "${field}".` }))
          default:
            return next(badRequest(`The upload was refused: ${err.message}.`))
        }
      }
      const e = err as { message?: string; status?: number }
      if (e && typeof e.message === 'string' && /multipart|boundary|Unexpected end of form/i.test(e.message)) {
        return next(badRequest('The upload is not a valid multipart form.'))
      }
      next(err)
    })
  }
}
