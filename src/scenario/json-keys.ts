/**
 * Duplicate keys in JSON text. JSON.parse keeps the last of two equal keys without a word; YAML
 * (and this tool) refuses them. This scan walks text that JSON.parse has already accepted and
 * finds the first key repeated inside one object, with the key path to it.
 */

/** The first repeated key (its path, as `a.b[2].c`) in JSON text JSON.parse accepted, or null. */
export function duplicateJsonKey(text: string): { path: string; key: string } | null {
  // a stack of open containers: an object's keys seen so far, or an array's next index
  const stack: ({ kind: 'object'; keys: Set<string>; path: string; key: string | null } | { kind: 'array'; path: string; index: number })[] = [];
  let expectKey = false;
  let i = 0;
  const here = (): string => {
    const top = stack[stack.length - 1];
    if (!top) return '';
    if (top.kind === 'array') return `${top.path}[${top.index}]`;
    return top.path === '' ? top.key ?? '' : `${top.path}.${top.key ?? ''}`;
  };
  while (i < text.length) {
    const c = text[i]!;
    if (c === '"') {
      let j = i + 1;
      while (j < text.length && text[j] !== '"') j += text[j] === '\\' ? 2 : 1;
      const token = text.slice(i, j + 1);
      i = j + 1;
      const top = stack[stack.length - 1];
      if (expectKey && top?.kind === 'object') {
        const key = JSON.parse(token) as string;
        const path = top.path === '' ? key : `${top.path}.${key}`;
        if (top.keys.has(key)) return { path, key };
        top.keys.add(key);
        top.key = key;
        expectKey = false;
      }
      continue;
    }
    if (c === '{') stack.push({ kind: 'object', keys: new Set(), path: here(), key: null }), (expectKey = true);
    else if (c === '[') stack.push({ kind: 'array', path: here(), index: 0 });
    else if (c === '}' || c === ']') stack.pop();
    else if (c === ',') {
      const top = stack[stack.length - 1];
      if (top?.kind === 'object') expectKey = true;
      else if (top?.kind === 'array') top.index++;
    }
    i++;
  }
  return null;
}
