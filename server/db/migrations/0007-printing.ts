/**
 * Printing: label templates (lab configuration, edited by admins) and the append-only record of label
 * prints (REQUIREMENTS LB-06, LB-07: who, when, which template as it was, how many copies, which record
 * version, original or reprint with its reason). Lengths are TEXT decimal strings in millimetres.
 *
 * label_prints is append-only: triggers refuse UPDATE and DELETE. A print stores the template and the label
 * content as they were (JSON), so its PDF can be rendered again, identically, from the stored row.
 *
 * Three starting templates with our own names are inserted, so a new lab can print at once.
 */
import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const LABEL_PRINTS_APPEND_ONLY = 'label_prints are append-only: print again (a reprint) instead';

const id = () => ({ type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true });
const text = (allowNull = true) => ({ type: DataTypes.TEXT, allowNull });
const ref = (table: string) => ({
  type: DataTypes.INTEGER,
  allowNull: false,
  references: { model: table, key: 'id' },
  onUpdate: 'RESTRICT',
  onDelete: 'RESTRICT',
});

export const DEFAULT_LABEL_TEMPLATES = [
  { name: 'Bench vial 38×25 full', width_mm: '38', height_mm: '25', layout: { kind: 'roll' }, content: 'full' },
  { name: 'Autosampler vial 25×12 small', width_mm: '25', height_mm: '12', layout: { kind: 'roll' }, content: 'small' },
  {
    name: 'A4 sheet 3×8 full',
    width_mm: '63.5',
    height_mm: '33.9',
    layout: { kind: 'sheet', pageSize: 'A4', rows: 8, columns: 3, marginTopMm: '12.9', marginLeftMm: '7.2', gapXMm: '2.5', gapYMm: '0' },
    content: 'full',
  },
] as const;

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.createTable('label_templates', {
    id: id(),
    name: { type: DataTypes.TEXT, allowNull: false, unique: true },
    width_mm: text(false),
    height_mm: text(false),
    layout: text(false), // JSON: { kind: "sheet", pageSize, rows, columns, margins, gaps } | { kind: "roll" }
    content: text(false), // full | small
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    created_at: text(false),
    updated_at: text(false),
  });

  await qi.createTable('label_prints', {
    id: id(),
    preparation_id: ref('preparations'),
    preparation_version: { type: DataTypes.INTEGER, allowNull: false },
    template_id: ref('label_templates'),
    template_snapshot: text(false), // JSON: the template as it was at printing
    label_snapshot: text(false), // JSON: the label content as printed (from the record version)
    status_at_print: text(false),
    copies: { type: DataTypes.INTEGER, allowNull: false },
    number: { type: DataTypes.INTEGER, allowNull: false }, // 1 = original, 2+ = reprints
    is_reprint: { type: DataTypes.BOOLEAN, allowNull: false },
    reason: text(),
    printed_by: ref('users'),
    printed_by_name: text(false),
    printed_at: text(false),
  });
  await qi.addIndex('label_prints', ['preparation_id', 'preparation_version', 'template_id', 'number'], {
    name: 'label_prints_series',
    unique: true,
  });

  await qi.sequelize.query(`CREATE TRIGGER label_prints_no_update BEFORE UPDATE ON label_prints BEGIN SELECT RAISE(ABORT, '${LABEL_PRINTS_APPEND_ONLY}'); END;`);
  await qi.sequelize.query(`CREATE TRIGGER label_prints_no_delete BEFORE DELETE ON label_prints BEGIN SELECT RAISE(ABORT, '${LABEL_PRINTS_APPEND_ONLY}'); END;`);

  const now = new Date().toISOString();
  await qi.bulkInsert(
    'label_templates',
    DEFAULT_LABEL_TEMPLATES.map((t) => ({ ...t, layout: JSON.stringify(t.layout), active: true, created_at: now, updated_at: now })),
  );
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.query('DROP TRIGGER IF EXISTS label_prints_no_update;');
  await qi.sequelize.query('DROP TRIGGER IF EXISTS label_prints_no_delete;');
  await qi.dropTable('label_prints');
  await qi.dropTable('label_templates');
}
