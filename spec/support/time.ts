export const addDays = (d: Date, days: number) => new Date(d.getTime() + days * 86400_000);
