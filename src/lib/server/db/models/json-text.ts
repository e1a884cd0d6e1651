import { DataTypes, type Model } from 'sequelize';

/** An attribute holding JSON as text: parsed on read, serialised on write (null stays null). */
export const jsonText = (field: string) => ({
	type: DataTypes.TEXT('long'),
	allowNull: true,
	get(this: Model) {
		const raw = this.getDataValue(field as never) as string | null;
		return raw == null ? null : JSON.parse(raw);
	},
	set(this: Model, v: unknown) {
		this.setDataValue(field as never, (v == null ? null : JSON.stringify(v)) as never);
	}
});
