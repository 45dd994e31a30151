/**
 * A small RFC 5545 reader for tests: unfolds lines (§3.1), splits each content line into name,
 * parameters and value, and nests components between BEGIN and END. Throws on a malformed file.
 */
export interface IcsProperty {
  name: string;
  params: Record<string, string>;
  value: string;
}

export interface IcsComponent {
  type: string;
  properties: IcsProperty[];
  components: IcsComponent[];
  /** The first property of that name, if any. */
  get(name: string): IcsProperty | undefined;
}

function component(type: string): IcsComponent {
  const c: IcsComponent = {
    type,
    properties: [],
    components: [],
    get(name) {
      return c.properties.find((p) => p.name === name.toUpperCase());
    },
  };
  return c;
}

export function parseIcs(text: string): IcsComponent {
  if (!/\r\n/.test(text)) throw new Error('iCalendar lines must end with CRLF');
  const lines = text
    .replace(/\r\n[ \t]/g, '')
    .split('\r\n')
    .filter((l) => l.length > 0);
  const stack: IcsComponent[] = [];
  let root: IcsComponent | undefined;
  for (const line of lines) {
    const m = /^([A-Za-z0-9-]+)((?:;[^:]*)?):(.*)$/.exec(line);
    if (!m) throw new Error(`not a content line: ${line}`);
    const name = m[1]!.toUpperCase();
    const value = m[3]!;
    const params: Record<string, string> = {};
    for (const part of (m[2] ?? '').split(';').filter(Boolean)) {
      const [k, ...v] = part.split('=');
      params[k!.toUpperCase()] = v.join('=');
    }
    if (name === 'BEGIN') {
      const c = component(value.toUpperCase());
      if (stack.length) stack[stack.length - 1]!.components.push(c);
      else if (root) throw new Error('more than one top-level component');
      else root = c;
      stack.push(c);
    } else if (name === 'END') {
      const open = stack.pop();
      if (!open || open.type !== value.toUpperCase()) throw new Error(`END:${value} does not close ${open?.type}`);
    } else {
      if (!stack.length) throw new Error(`property outside a component: ${line}`);
      stack[stack.length - 1]!.properties.push({ name, params, value });
    }
  }
  if (stack.length || !root) throw new Error('unterminated iCalendar');
  return root;
}

/** A DATE-TIME value in UTC form (`20261207T090000Z`) as a Date. */
export function icsUtc(value: string): Date {
  const m = /^(\d{4})(\d{2})(\d{2})T(\d{2})(\d{2})(\d{2})Z$/.exec(value);
  if (!m) throw new Error(`not a UTC DATE-TIME: ${value}`);
  return new Date(Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!, +m[4]!, +m[5]!, +m[6]!));
}
