// The review state's name for the one API client ($lib/api/client).
export { callApi, type ApiResult } from '$lib/api/client';
