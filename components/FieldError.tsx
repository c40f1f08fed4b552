// Errors for one form field, announced and linked with aria-describedby="<id>".
export function FieldError({ id, errors }: { id: string; errors?: string[] }) {
  return (
    <p id={id} aria-live="polite" className="mt-1 text-sm text-problem">
      {errors?.length ? (
        <>
          <span aria-hidden="true">✕ </span>
          {errors.join(" ")}
        </>
      ) : null}
    </p>
  );
}
