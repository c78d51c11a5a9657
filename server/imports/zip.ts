// Zip archives from uploads (KMZ, zipped shapefiles), opened defensively: the central
// directory is read first (APPNOTE.TXT, PKWARE's .ZIP File Format Specification, 4.3.12
// and 4.3.16) and the archive is refused BEFORE anything is expanded when it has too many
// entries, declares too much expanded data, has unsafe paths (../, absolute, drive
// letters), encryption, ZIP64 records or compression other than stored/deflate. While
// expanding, the bytes actually produced are counted, so an archive that lies about its
// sizes is stopped at the limit as well.
import JSZip from 'jszip'
import { HttpError, badRequest } from '../http/errors.ts'
import { MB } from './upload.ts'

export interface ZipLimits {
  maxEntries: number
  maxExpandedBytes: number
}

export const DEFAULT_ZIP_LIMITS: ZipLimits = { maxEntries: 200, maxExpandedBytes: 50 * MB }

export interface ZipEntryInfo {
  name: string
  compressedBytes: number
  expandedBytes: number
  isDirectory: boolean
}

const EOCD_SIGNATURE = 0x06054b50
const CENTRAL_SIGNATURE = 0x02014b50

export const isZip = (b: Buffer) => b.length >= 4 && b[0] === 0x50 && b[1] === 0x4b && (b[2] === 0x03 || b[2] === 0x05) && (b[3] === 0x04 || b[3] === 0x06)

const broken = (why: string) => badRequest(`The zip file is damaged or incomplete (${why}).`, { file: `The zip file is damaged or incomplete (${why}).` })

/** True for a path that could leave the folder it is expanded into. */
export function unsafeZipPath(name: string): boolean {
  if (name.includes('\0')) return true
  const n = name.replace(/\\/g, '/')
  if (n.startsWith('/') || /^[a-zA-Z]:/.test(n)) return true
  return n.split('/').some((part) => part === '..')
}

/** Lists the entries from the central directory and enforces the limits; expands nothing. */
export function inspectZip(buf: Buffer, limits: ZipLimits = DEFAULT_ZIP_LIMITS): ZipEntryInfo[] {
  const minEocd = 22
  if (buf.length < minEocd) throw broken('too short to hold a zip directory')
  let eocd = -1
  for (let i = buf.length - minEocd; i >= Math.max(0, buf.length - minEocd - 0xffff); i--) {
    if (buf.readUInt32LE(i) === EOCD_SIGNATURE) {
      eocd = i
      break
    }
  }
  if (eocd < 0) throw broken('no end-of-directory record')
  const totalEntries = buf.readUInt16LE(eocd + 10)
  const cdSize = buf.readUInt32LE(eocd + 12)
  const cdOffset = buf.readUInt32LE(eocd + 16)
  if (totalEntries === 0xffff || cdOffset === 0xffffffff || cdSize === 0xffffffff) {
    throw badRequest('ZIP64 archives are not accepted; zip the files with a standard zip tool.', { file: 'ZIP64 archives are not accepted.' })
  }
  if (buf.readUInt16LE(eocd + 4) !== 0 || buf.readUInt16LE(eocd + 6) !== 0) throw badRequest('Split (multi-part) zip archives are not accepted.')
  if (totalEntries > limits.maxEntries) {
    const msg = `The zip file holds ${totalEntries.toLocaleString('en-US')} entries; at most ${limits.maxEntries} are accepted.`
    throw new HttpError(413, 'payload_too_large', msg, { file: msg })
  }
  if (cdOffset + cdSize > eocd) throw broken('the directory lies outside the file')
  const entries: ZipEntryInfo[] = []
  let expanded = 0
  let p = cdOffset
  for (let k = 0; k < totalEntries; k++) {
    if (p + 46 > buf.length || buf.readUInt32LE(p) !== CENTRAL_SIGNATURE) throw broken(`directory entry ${k + 1} is unreadable`)
    const flags = buf.readUInt16LE(p + 8)
    const method = buf.readUInt16LE(p + 10)
    const compressedBytes = buf.readUInt32LE(p + 20)
    const expandedBytes = buf.readUInt32LE(p + 24)
    const nameLength = buf.readUInt16LE(p + 28)
    const extraLength = buf.readUInt16LE(p + 30)
    const commentLength = buf.readUInt16LE(p + 32)
    if (p + 46 + nameLength > buf.length) throw broken(`directory entry ${k + 1} is cut off`)
    const name = buf.toString(flags & 0x800 ? 'utf8' : 'latin1', p + 46, p + 46 + nameLength)
    if (compressedBytes === 0xffffffff || expandedBytes === 0xffffffff) {
      throw badRequest('ZIP64 archives are not accepted; zip the files with a standard zip tool.', { file: 'ZIP64 archives are not accepted.' })
    }
    if (unsafeZipPath(name)) {
      const msg = `The zip file holds an entry with an unsafe path ("${name.slice(0, 80)}"); it was refused.`
      throw badRequest(msg, { file: msg })
    }
    if (flags & 0x1) throw badRequest(`The zip entry "${name.slice(0, 80)}" is encrypted; upload an archive without a password.`)
    const isDirectory = name.endsWith('/')
    if (!isDirectory && method !== 0 && method !== 8) {
      throw badRequest(`The zip entry "${name.slice(0, 80)}" uses a compression method (${method}) that is not accepted; use a standard zip tool.`)
    }
    expanded += expandedBytes
    if (expanded > limits.maxExpandedBytes) {
      const msg = `The zip file would expand to more than ${Math.round(limits.maxExpandedBytes / MB)} MB; it was refused.`
      throw new HttpError(413, 'payload_too_large', msg, { file: msg })
    }
    entries.push({ name, compressedBytes, expandedBytes, isDirectory })
    p += 46 + nameLength + extraLength + commentLength
  }
  return entries
}

/**
 * Expands the named entries (after inspectZip has passed), counting real bytes against
 * each entry's declared size and the overall limit. Returns name -> bytes.
 */
export async function expandEntries(
  buf: Buffer,
  entries: ZipEntryInfo[],
  wanted: string[],
  limits: ZipLimits = DEFAULT_ZIP_LIMITS,
): Promise<Map<string, Buffer>> {
  let zip: JSZip
  try {
    zip = await JSZip.loadAsync(buf, { checkCRC32: false })
  } catch (error) {
    throw broken(error instanceof Error ? error.message.replace(/\.$/, '') : 'unreadable')
  }
  const declared = new Map(entries.map((e) => [e.name, e.expandedBytes]))
  const out = new Map<string, Buffer>()
  let total = 0
  for (const name of wanted) {
    const file = zip.file(name)
    if (!file) continue
    const cap = Math.min(declared.get(name) ?? 0, limits.maxExpandedBytes)
    const chunks: Buffer[] = []
    let size = 0
    await new Promise<void>((resolve, reject) => {
      const stream = file.nodeStream('nodebuffer')
      stream.on('data', (chunk: Buffer) => {
        size += chunk.length
        total += chunk.length
        if (size > cap || total > limits.maxExpandedBytes) {
          ;(stream as unknown as { pause(): void }).pause()
          const msg = `The zip entry "${name.slice(0, 80)}" expands beyond its declared size; the file was refused.`
          reject(new HttpError(413, 'payload_too_large', msg, { file: msg }))
          return
        }
        chunks.push(chunk)
      })
      stream.on('error', (error: Error) => reject(broken(error.message.replace(/\.$/, ''))))
      stream.on('end', () => resolve())
    })
    out.set(name, Buffer.concat(chunks))
  }
  return out
}
