/**
 * `write` again when MariaDB chose it as a deadlock's victim (error 1213: "try restarting transaction"): short
 * transactions that lock a project (a run's start, the next run queued, a finishing run taking its storage
 * room, an upload) can meet one another. `write` must be a whole transaction (or a single statement), so a
 * retry starts it afresh. Any other error, and the last attempt's, goes to the caller.
 */
export async function retryOnDeadlock<T>(write: () => Promise<T>, tries = 5): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await write();
    } catch (err) {
      const code = (err as { parent?: { errno?: number } }).parent?.errno;
      if (code !== 1213 || attempt >= tries) throw err;
      await new Promise((resolve) => setTimeout(resolve, 20 * attempt));
    }
  }
}
