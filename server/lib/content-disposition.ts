/**
 * `Content-Disposition` for a download: a plain ASCII `filename` for every client plus the exact UTF-8
 * name as `filename*` (RFC 6266 / RFC 5987). Example: ('attachment', 'Rose é.png') →
 * `attachment; filename="Rose _.png"; filename*=UTF-8''Rose%20%C3%A9.png`.
 */
export function contentDisposition(type: 'attachment' | 'inline', name: string): string {
  const ascii = name.replace(/[^\x20-\x7e]|["\\]/g, '_');
  const value = `${type}; filename="${ascii}"`;
  if (ascii === name) return value;
  const encoded = encodeURIComponent(name).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
  return `${value}; filename*=UTF-8''${encoded}`;
}
