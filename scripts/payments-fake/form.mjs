// Decodes the provider's form encoding: `items[0][price]=p&expand[]=x&metadata[trust_id]=t`
// becomes { items: [{ price: 'p' }], expand: ['x'], metadata: { trust_id: 't' } }.

/** Parses an application/x-www-form-urlencoded string with bracketed keys into nested objects and arrays. */
export function parseForm(text) {
  const root = {};
  for (const [rawKey, value] of new URLSearchParams(text)) {
    const parts = rawKey.replace(/\]/g, '').split('[');
    let node = root;
    parts.forEach((part, index) => {
      const last = index === parts.length - 1;
      const nextIsIndex = !last && /^\d*$/.test(parts[index + 1]);
      const key = part === '' && Array.isArray(node) ? node.length : part;
      if (last) {
        node[key] = value;
        return;
      }
      node[key] ??= nextIsIndex ? [] : {};
      node = node[key];
    });
  }
  return compactArrays(root);
}

// Sparse arrays (items[1] without items[0]) become dense; objects keyed by digits stay objects.
function compactArrays(value) {
  if (Array.isArray(value)) return value.filter((v) => v !== undefined).map(compactArrays);
  if (value && typeof value === 'object') {
    return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, compactArrays(v)]));
  }
  return value;
}

/** Reads a boolean the SDK sent as "true"/"false". */
export function bool(value) {
  return value === true || value === 'true';
}

/** Reads an integer parameter, or undefined when absent or empty. */
export function int(value) {
  if (value === undefined || value === '') return undefined;
  const n = Number(value);
  return Number.isInteger(n) ? n : Number.NaN;
}
