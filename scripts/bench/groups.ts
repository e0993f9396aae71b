/**
 * Broader subjects for the bench's narrower-subject measurement: the bench categories grouped by hand
 * into an invented vocabulary (common knowledge of what the words mean; no source). Categories not
 * listed are simply not used for that measurement.
 */
export const BROADER_GROUPS: Record<string, string[]> = {
  mammals: ['ape', 'bat', 'bear', 'camel', 'cat', 'cow', 'deer', 'dog', 'dolphin', 'elephant', 'giraffe', 'hedgehog', 'horse', 'kangaroo', 'lion', 'mouse', 'pig', 'rabbit', 'raccoon', 'rhinoceros', 'seal', 'sheep', 'squirrel', 'tiger', 'zebra'],
  birds: ['chicken', 'duck', 'owl', 'parrot', 'penguin', 'seagull', 'songbird', 'swan', 'wading_bird'],
  'small creatures': ['ant', 'bee', 'beetle', 'butterfly', 'spider', 'scorpion', 'snail', 'jellyfish', 'starfish', 'crab', 'hermit_crab', 'lobster'],
  'reptiles and fish': ['crocodilian', 'frog', 'lizard', 'snake', 'turtle', 'sea_turtle', 'fish', 'shark', 'ray'],
  vehicles: ['airplane', 'bicycle', 'blimp', 'car_(sedan)', 'helicopter', 'hot-air_balloon', 'motorcycle', 'pickup_truck', 'rocket', 'sailboat', 'tank', 'wheelchair'],
  food: ['apple', 'banana', 'bread', 'hamburger', 'hotdog', 'pear', 'pineapple', 'pizza', 'pretzel', 'strawberry', 'mushroom'],
  instruments: ['bell', 'guitar', 'harp', 'piano', 'saxophone', 'trumpet', 'violin'],
  'weapons and tools': ['axe', 'cannon', 'hammer', 'knife', 'pistol', 'rifle', 'saw', 'scissors', 'sword', 'armor'],
  buildings: ['cabin', 'castle', 'church', 'skyscraper', 'windmill', 'door', 'window'],
  household: ['bench', 'chair', 'couch', 'table', 'fan', 'candle', 'cup', 'teapot', 'spoon', 'wine_bottle', 'umbrella', 'alarm_clock', 'hourglass'],
};
