/**
 * The Python interpreter with numpy and scipy that the test command found and exported as PW_PYTHON
 * (scripts/lib/ensure-system.sh); plain `python3` when vitest is started by hand without it.
 */
export const PYTHON = process.env.PW_PYTHON ?? 'python3';
