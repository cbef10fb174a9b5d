/**
 * A host-faithful harness for the built custom functions: dist/functions.js is loaded in a
 * fresh node:vm context whose only global besides the JavaScript built-ins is a stand-in
 * `CustomFunctions` (associate, Error, ErrorCode), as in the host's custom-functions runtime.
 * Functions are then called by the ids in dist/functions.json exactly as the host calls them:
 * 2-D arrays for ranges, null for each omitted optional argument, and an invocation object last
 * where the metadata asks for one.
 */
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import vm from "node:vm";

export const DIST = resolve(__dirname, "../../dist");

export const ErrorCode = {
  invalidValue: "#VALUE!",
  notAvailable: "#N/A",
  divisionByZero: "#DIV/0!",
  invalidNumber: "#NUM!",
  nullReference: "#NULL!",
  invalidName: "#NAME?",
  invalidReference: "#REF!",
} as const;

/** Stand-in for CustomFunctions.Error. */
export class HostError {
  constructor(
    readonly code: string,
    readonly message?: string,
  ) {}
}

export interface FunctionMeta {
  id: string;
  name: string;
  parameters: { name: string; optional?: boolean; dimensionality?: string; type?: string }[];
  options?: { requiresAddress?: boolean; requiresParameterAddresses?: boolean };
  result: { dimensionality?: string };
}

export interface Host {
  meta: { functions: FunctionMeta[]; allowErrorForDataTypeAny?: boolean };
  fns: Map<string, (...args: unknown[]) => unknown>;
  /** Call by id with named arguments; omitted optional arguments are passed as null. */
  call(id: string, args: Record<string, unknown>, address?: string, parameterAddresses?: Record<string, string>): unknown;
}

/** Extra globals for the context (e.g. a stand-in `Excel` for the shared runtime's Excel API). */
export function loadHost(globals: Record<string, unknown> = {}): Host {
  const code = readFileSync(resolve(DIST, "functions.js"), "utf8");
  const meta = JSON.parse(readFileSync(resolve(DIST, "functions.json"), "utf8")) as Host["meta"];
  const fns = new Map<string, (...args: unknown[]) => unknown>();
  const CustomFunctions = {
    associate(id: string | Record<string, (...a: unknown[]) => unknown>, f?: (...a: unknown[]) => unknown) {
      if (typeof id === "string") fns.set(id, f!);
      else for (const [k, v] of Object.entries(id)) fns.set(k, v);
    },
    Error: HostError,
    ErrorCode,
  };
  const context = vm.createContext({ CustomFunctions, ...globals });
  vm.runInContext(code, context, { filename: "functions.js" });
  return {
    meta,
    fns,
    call(id, args, address = "Sheet1!A1", parameterAddresses = {}) {
      const m = meta.functions.find((f) => f.id === id);
      if (!m) throw new Error(`no function ${id} in functions.json`);
      const f = fns.get(id);
      if (!f) throw new Error(`function ${id} was not associated`);
      const list: unknown[] = m.parameters.map((p) => (p.name in args ? args[p.name] : null));
      if (m.options?.requiresAddress || m.options?.requiresParameterAddresses)
        list.push({ address, parameterAddresses: m.parameters.map((p) => parameterAddresses[p.name] ?? ""), functionName: id });
      return f(...list);
    },
  };
}

/** Call and capture either the result or the thrown error (never rethrows a host error). */
export function outcome(host: Host, id: string, args: Record<string, unknown>): { value?: unknown[][]; error?: HostError; thrown?: unknown } {
  try {
    return { value: host.call(id, args) as unknown[][] };
  } catch (e) {
    if (e instanceof HostError) return { error: e };
    return { thrown: e };
  }
}

/** A column of numbers as a 2-D range. */
export const col = (v: readonly unknown[]): unknown[][] => v.map((x) => [x]);
