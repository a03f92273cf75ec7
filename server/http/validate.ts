/** Validates a payload against its shared Yup schema; failures become 400 with every field named. */
import type { AnyObject, InferType, ObjectSchema } from 'yup';

export async function parseBody<S extends ObjectSchema<AnyObject>>(schema: S, body: unknown): Promise<InferType<S>> {
  const input = body && typeof body === 'object' && !Array.isArray(body) ? body : {};
  return schema.validate(input, { abortEarly: false, stripUnknown: true }) as Promise<InferType<S>>;
}
