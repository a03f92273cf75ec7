/** "1 patient", "3 patients": a count with its noun (the plural given where it is not just an added s). */
export const plural = (count: number, word: string, many = `${word}s`) => `${count} ${count === 1 ? word : many}`;
