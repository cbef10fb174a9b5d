// Remove dist/ before a build: a failed production build emits nothing, so a stale dist/ could remain.
import { rmSync } from "node:fs";
rmSync(new URL("../dist", import.meta.url), { recursive: true, force: true });
