/** The product and the co-op it runs for (the demo co-op; a setting once Settings exists). */
export const productName = 'Cellarwright';
export const coopName = 'Larkspur Yard Brewing Co-op';
