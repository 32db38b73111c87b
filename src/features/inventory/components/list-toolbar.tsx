export type Option = { value: string; label: string };

function FilterSelect({ id, label, value, options, onChange }: { id: string; label: string; value: string; options: Option[]; onChange: (v: string) => void }) {
  return (
    <div className="min-w-44">
      <label htmlFor={id} className="mb-1 block text-sm font-semibold">
        {label}
      </label>
      <select id={id} name={id} value={value} onChange={(e) => onChange(e.target.value)} className="field-input">
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </div>
  );
}

/** Search box (the caller debounces it), status filter and the register's one extra filter. */
export function ListToolbar({
  search,
  onSearch,
  searchPlaceholder,
  status,
  statusOptions,
  onStatus,
  extra,
}: {
  search: string;
  onSearch: (v: string) => void;
  searchPlaceholder: string;
  status: string;
  statusOptions: Option[];
  onStatus: (v: string) => void;
  extra?: { id: string; label: string; value: string; options: Option[]; onChange: (v: string) => void };
}) {
  return (
    <div role="search" className="flex flex-wrap items-end gap-3">
      <div className="min-w-0 flex-[1_1_18rem]">
        <label htmlFor="list-search" className="mb-1 block text-sm font-semibold">
          Search
        </label>
        <input
          id="list-search"
          name="search"
          type="search"
          value={search}
          onChange={(e) => onSearch(e.target.value)}
          placeholder={searchPlaceholder}
          autoComplete="off"
          spellCheck={false}
          className="field-input"
          data-testid="list-search"
        />
      </div>
      <FilterSelect id="status" label="Status" value={status} options={[{ value: '', label: 'Any status' }, ...statusOptions]} onChange={onStatus} />
      {extra ? <FilterSelect id={extra.id} label={extra.label} value={extra.value} options={extra.options} onChange={extra.onChange} /> : null}
    </div>
  );
}
