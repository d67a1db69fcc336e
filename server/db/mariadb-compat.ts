/**
 * Compatibility fix between Sequelize 6.37 and the mariadb driver ≥ 3.1.
 *
 * The driver returns result arrays whose `meta` property is non-configurable, so Sequelize's raw-query
 * formatting (`delete data.meta`) throws "Cannot delete property 'meta'". This wraps the dialect's
 * `formatResults` to hand it a plain copy of such arrays. Loaded once, before any Sequelize instance exists.
 */
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);
const MariaDbQuery = require('sequelize/lib/dialects/mariadb/query') as {
  prototype: { formatResults(data: unknown): unknown; __pwPatched?: boolean };
};

const proto = MariaDbQuery.prototype;
if (!proto.__pwPatched) {
  const original = proto.formatResults;
  proto.formatResults = function formatResults(this: unknown, data: unknown) {
    if (Array.isArray(data)) {
      const descriptor = Object.getOwnPropertyDescriptor(data, 'meta');
      if (descriptor && !descriptor.configurable) {
        const copy: unknown[] & { meta?: unknown } = [...data];
        copy.meta = (data as unknown as { meta: unknown }).meta;
        return original.call(this, copy);
      }
    }
    return original.call(this, data);
  };
  proto.__pwPatched = true;
}
