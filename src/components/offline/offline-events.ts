// Events between the offline form and the photo uploader on the oil-change page (two islands).

/** Asked of the photo uploader on save: the photos not yet on the server, pushed into the event's detail array as Blobs. */
export const COLLECT_PHOTOS_EVENT = 'sumpwise:collect-photos';
/** Told to the photo uploader once its photos are kept in the outbox (it lets go of them). */
export const PHOTOS_KEPT_EVENT = 'sumpwise:photos-kept';
