/** A file download response with a safe file name (ASCII fallback and RFC 5987 UTF-8 name). */
export function attachment(bytes: Buffer, contentType: string, fileName: string): Response {
  const ascii = fileName.replace(/[^A-Za-z0-9 ._-]/g, '_').slice(0, 150) || 'airtally-programme';
  return new Response(new Uint8Array(bytes), {
    headers: {
      'content-type': contentType,
      'content-disposition': `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(fileName)}`,
    },
  });
}
