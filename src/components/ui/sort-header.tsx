import { SortIcon } from '@/components/ui/icons';

interface SortHeaderProps<K extends string> {
  label: string;
  sortKey: K;
  sort: { sort: K; dir: 'asc' | 'desc' };
  onSort: (sort: K) => void;
  align?: 'left' | 'right';
  className?: string;
}

/** A column header that sorts its table; announces the current order to screen readers. */
export function SortHeader<K extends string>({ label, sortKey, sort, onSort, align = 'left', className = 'px-4' }: SortHeaderProps<K>) {
  const active = sort.sort === sortKey;
  const order = sort.dir === 'asc' ? 'ascending' : 'descending';
  return (
    <th
      scope="col"
      aria-sort={active ? order : 'none'}
      className={`${className} py-3 font-bold whitespace-nowrap ${align === 'right' ? 'text-right' : 'text-left'}`}
    >
      <button
        type="button"
        onClick={() => onSort(sortKey)}
        className={`-mx-1 inline-flex items-center gap-1 rounded-md px-1 hover:text-ink ${active ? 'text-ink' : ''}`}
      >
        {label}
        <SortIcon direction={active ? sort.dir : 'none'} />
        <span className="sr-only">{active ? `, sorted ${order}; ` : ', '}select to sort</span>
      </button>
    </th>
  );
}
