/**
 * Values of OpenSCENARIO attributes: a literal, a parameter reference "$name", or an expression
 * "${…}" with + − * / %, parentheses, unary minus, numbers and parameter references (ASAM OpenSCENARIO
 * 1.2, 9.2 "Expressions"; the functions of the standard's expression grammar are not supported).
 * Returns null (with a reason) when the text cannot be evaluated.
 */
export function evaluateValue(text: string, params: ReadonlyMap<string, string>): { value: string } | { error: string } {
  if (/^\$[A-Za-z_][A-Za-z0-9_]*$/.test(text)) {
    const v = params.get(text.slice(1));
    return v === undefined ? { error: `parameter ${text} is not declared` } : { value: v };
  }
  if (text.startsWith("${") && text.endsWith("}")) {
    const r = evaluateExpression(text.slice(2, -1), params);
    return "error" in r ? r : { value: String(r.value) };
  }
  return { value: text };
}

function evaluateExpression(src: string, params: ReadonlyMap<string, string>): { value: number } | { error: string } {
  const tokens = src.match(/\s*(\d+(?:\.\d*)?(?:[eE][+-]?\d+)?|\.\d+(?:[eE][+-]?\d+)?|\$[A-Za-z_][A-Za-z0-9_]*|[-+*/%()])/gy);
  if (!tokens || tokens.join("").replace(/\s/g, "") !== src.replace(/\s/g, "")) return { error: `expression "\${${src}}" has characters outside numbers, $parameters and + - * / % ( )` };
  const t = tokens.map((s) => s.trim());
  let i = 0;
  let err: string | null = null;
  const primary = (): number => {
    const tok = t[i++];
    if (tok === undefined) {
      err = "expression ends early";
      return NaN;
    }
    if (tok === "(") {
      const v = sum();
      if (t[i++] !== ")") err = "missing )";
      return v;
    }
    if (tok === "-") return -primary();
    if (tok.startsWith("$")) {
      const v = params.get(tok.slice(1));
      if (v === undefined || !Number.isFinite(Number(v))) {
        err = v === undefined ? `parameter ${tok} is not declared` : `parameter ${tok}="${v}" is not a number`;
        return NaN;
      }
      return Number(v);
    }
    const v = Number(tok);
    if (!Number.isFinite(v)) err = `unexpected "${tok}"`;
    return v;
  };
  const product = (): number => {
    let v = primary();
    while (t[i] === "*" || t[i] === "/" || t[i] === "%") {
      const op = t[i++];
      const r = primary();
      v = op === "*" ? v * r : op === "/" ? v / r : v % r;
    }
    return v;
  };
  const sum = (): number => {
    let v = product();
    while (t[i] === "+" || t[i] === "-") {
      const op = t[i++];
      const r = product();
      v = op === "+" ? v + r : v - r;
    }
    return v;
  };
  const v = sum();
  if (err === null && i !== t.length) err = `unexpected "${t[i]}"`;
  if (err === null && !Number.isFinite(v)) err = "result is not a finite number";
  return err !== null ? { error: `expression "\${${src}}": ${err}` } : { value: v };
}
