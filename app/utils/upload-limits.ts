const MB = 1024 * 1024

/**
 * How much one upload may carry; the server enforces it, the upload control checks first so a
 * person on a slow link is told before the bytes are sent. A phone photo is 2–6 MB and a scanned
 * report a few more; 15 MB leaves room for a large one, and ten files or 40 MB in all keep one
 * request from holding the server for long.
 */
export const UPLOAD_LIMITS = { fileBytes: 15 * MB, files: 10, requestBytes: 40 * MB } as const

/** What the file picker offers; the server decides by the bytes, whatever the picker allowed. */
export const UPLOAD_ACCEPT = 'image/*,application/pdf'

export const sizeInWords = (bytes: number) => (bytes < MB ? `${Math.max(1, Math.round(bytes / 1024))} KB` : `${Math.round((bytes / MB) * 10) / 10} MB`)
