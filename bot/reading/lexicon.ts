// The one vocabulary of ordinary request wording: the words people use around the data's own
// terms. Every reader (a request, an answer to a question, a correction to the brief card, a
// plan edit) looks words up here, so a phrase that works in one works in all. Data terms come
// from each dataset's catalog and values, never from here.
import { GRAIN_WORDS } from '../../analysis/grains.js';
import { AUDIENCES, type Audience, GRAINS, type Grain, type GrowthRank, type RankOrder } from '../../analysis/types.js';

export { GRAIN_WORDS } from '../../analysis/grains.js';

// ---- calendar words ----

const MONTHS: [RegExp, number][] = [
  [/^jan(uary)?$/, 1],
  [/^feb(ruary)?$/, 2],
  [/^mar(ch)?$/, 3],
  [/^apr(il)?$/, 4],
  [/^may$/, 5],
  [/^june?$/, 6],
  [/^july?$/, 7],
  [/^aug(ust)?$/, 8],
  [/^sep(t(ember)?)?$/, 9],
  [/^oct(ober)?$/, 10],
  [/^nov(ember)?$/, 11],
  [/^dec(ember)?$/, 12],
];
export const MONTH_PATTERN = 'jan(?:uary)?|feb(?:ruary)?|mar(?:ch)?|apr(?:il)?|may|june?|july?|aug(?:ust)?|sept(?:ember)?|sep|oct(?:ober)?|nov(?:ember)?|dec(?:ember)?';

export function monthNumber(word: string): number | undefined {
  const w = word.toLowerCase().replace(/\.$/, '');
  return MONTHS.find(([re]) => re.test(w))?.[1];
}

const NUMBER_WORDS: Record<string, number> = {
  one: 1, two: 2, three: 3, four: 4, five: 5, six: 6, seven: 7, eight: 8, nine: 9, ten: 10,
  eleven: 11, twelve: 12, thirteen: 13, fourteen: 14, fifteen: 15, sixteen: 16, eighteen: 18,
  twenty: 20, thirty: 30, sixty: 60, ninety: 90, a: 1, an: 1, couple: 2, 'a couple of': 2,
};
export const NUMBER_WORD_PATTERN = 'a\\s+couple\\s+of|couple\\s+of|one|two|three|four|five|six|seven|eight|nine|ten|eleven|twelve|thirteen|fourteen|fifteen|sixteen|eighteen|twenty|thirty|sixty|ninety';

export function numberFromWord(word: string): number | undefined {
  const w = word.toLowerCase().replace(/\s+/g, ' ').replace(/ of$/, '');
  return NUMBER_WORDS[w] ?? NUMBER_WORDS[`a ${w}`];
}

const ORDINALS: Record<string, number> = { first: 1, second: 2, third: 3, fourth: 4, fifth: 5, '1st': 1, '2nd': 2, '3rd': 3, '4th': 4, '5th': 5 };
export const ORDINAL_PATTERN = 'first|second|third|fourth|fifth|1st|2nd|3rd|4th|5th';

export function ordinalNumber(word: string): number | undefined {
  return ORDINALS[word.toLowerCase()];
}

export const WEEKDAYS = ['monday', 'tuesday', 'wednesday', 'thursday', 'friday', 'saturday', 'sunday'] as const;
export const WEEKDAY_PATTERN = 'mon(?:day)?|tue(?:s(?:day)?)?|wed(?:nesday)?|thu(?:rs(?:day)?)?|fri(?:day)?|sat(?:urday)?|sun(?:day)?';

/** 1 for Monday ... 7 for Sunday (ISO). */
export function weekdayNumber(word: string): number | undefined {
  const w = word.toLowerCase();
  const i = WEEKDAYS.findIndex((d) => d.startsWith(w.slice(0, 3)));
  return i >= 0 ? i + 1 : undefined;
}

// ---- grains ----

/** The grain a standalone answer names ("weekly", "by month", "quarters", "q"), if any. */
export function grainNamedBy(text: string): Grain | undefined {
  const t = text.toLowerCase();
  for (const g of GRAINS) {
    const w = GRAIN_WORDS[g];
    const words = [w.adjective, w.noun, w.plural, ...w.extra].map((x) => x.replace(/[-\s]+/g, '[-\\s]+'));
    if (new RegExp(`(?<![\\p{L}])(?:${words.join('|')})(?![\\p{L}])`, 'u').test(t)) return g;
  }
  if (/^\s*q\s*$/.test(t)) return 'quarter';
  return undefined;
}

// ---- audiences ----

export const AUDIENCE_CUES: Record<Audience, RegExp> = {
  leadership:
    /\b((?:vp|svp|evp|head|chief)\s+of\s+(?:[a-z]+\s?){1,3}|vps?|svp|evp|leadership|leaders|the board|board (?:meeting|pack|paper|deck|update|members?|report)|for (?:the )?board|board-level|exec(?:s|utives?|utive team)?|(?:the )?c-suite|c-level|ceo|cfo|coo|cmo|cto|md|managing director|directors?|senior (?:management|leadership|team|leaders)|slt|elt|top team|management team|investors?|shareholders?|chair(?:man|woman|person)?|trustees)\b/i,
  managers:
    /\b(managers?|manager's|my team|our team|(?:from|for) the (?:growth|marketing|sales|ops|operations|finance|product|commercial|customer success|cs|support|service|insights|strategy|revenue|people|hr) team|team leads?|support leads|leads meeting|the team meeting|team meeting|team review|heads? of(?: the)?(?: [a-z]+)?|(?:ops|operations|finance|sales|marketing|commercial|product|support|customer|service|regional|station|store|site|weekly|monthly|quarterly|business|performance)\s+(?:review|meeting|sync|huddle|standup|stand-up|catch-?up|call|update)|line managers?|supervisors?|team leads?|my boss|for my manager)\b/i,
  analysts:
    /\b(analysts?|analyst team|technical (?:detail|audience|appendix|readers?)|(?:with|include|show)(?: the)? (?:p-?values?|confidence intervals?|test statistics|methodology|stats detail)|p-?values?|statistically rigorous|deep[- ]dive|for the data (?:folks|people)|data scientists?)\b/i,
};

export const AUDIENCE_LABELS: Record<Audience, { label: string; detail: string }> = {
  leadership: { label: 'Leadership', detail: 'plain words, headline first' },
  managers: { label: 'Managers', detail: 'plain words with the detail' },
  analysts: { label: 'Analysts', detail: 'tests, p-values and intervals' },
};

/** The audience a short answer or correction names ("for leadership", "execs", "the analysts"). */
export function audienceNamedBy(text: string): Audience | undefined {
  const t = text.toLowerCase();
  for (const a of AUDIENCES) if (new RegExp(`\\b${a.slice(0, -1)}`, 'i').test(t)) return a;
  return AUDIENCES.find((a) => AUDIENCE_CUES[a].test(t)) ?? (/\b(senior|exec|board)/.test(t) ? 'leadership' : undefined);
}

// ---- agreeing, cancelling ----

export const AGREE = /^\s*(?:go|go ahead|go for it|yes|yep|yeah|y|ok|okay|k|sure|fine|agreed?|agree|looks good|looks great|lgtm|run(?: it)?|start|do it|sounds good|perfect|great|ship it|proceed|confirm(?:ed)?|👍|✅)(?:[,!. ]+(?:thanks|thank you|please|go|run it|ta|cheers))*\s*[.!]*\s*$/iu;
export const ACCEPT_DEFAULT = /^\s*(?:|ok|okay|yes|y|sure|fine|default|recommended|use recommended|go with (?:that|the default|your suggestion|the recommendation)|sounds good|whatever you (?:think|recommend)|your call|you choose|👍)\s*[.!]?\s*$/iu;
export const CANCEL = /^\s*(?:cancel|stop|abort|never ?mind|forget it|scrap (?:it|that)|drop it)\b/i;

// ---- kinds of question ----

/** Asks when in the year something is high or low ("the busiest and quietest months"). */
export const SEASON_ASK = /\bbusiest\b|\bquietest\b|\bslowest\b|\bpeak\w*|\btrough\w*|\bwhen in the year\b|\bwhich (?:months?|weeks?|quarters?) (?:is|are|was|were)\b|\btime of (?:the )?year\b/;
/** Asks how days of the week differ ("weekdays", "weekends vs weekdays"). */
/** A group's own growth asked ("did the programme shops grow faster", "growing more slowly"): its growth, not its level. */
export const GROUP_GROWTH_ASK = /\b(?:grow|grew|grown|growing|growth)\b/;

/**
 * How concentrated a measure is across a breakdown ("how many airports make up 80% of flights",
 * "how concentrated is revenue across routes", "Pareto of customers", "80/20"): the shares answer it.
 */
export const CONCENTRATION_ASK = /\b(?:make|makes|made|making|account\s+for|accounts\s+for|reach|reaches|carry|carries)\s+(?:up\s+)?(?:about\s+|over\s+|half|the\s+bulk|most|\d{1,2}(?:\.\d+)?\s*%|\d{1,2}\s+per\s*cent)|\bhow\s+concentrated\b|\bconcentration\b|\bpareto\b|\b80\s*\/\s*20\b|\blong\s+tail\b/;

/**
 * A part of a whole asked about ("what share of all flights", "what percentage of flights",
 * "how big a slice of departures", "ATL's share", "what part of the total"): with one value of the
 * data named, that value is the focus whose share is asked, not a filter that removes the rest
 * (bot/reading/share-focus.ts).
 */
export const SHARE_ASK = /\b(?:share|percentage|proportion|percent|fraction|portion|slice|cut)\s+of\b|\bpart\s+of\s+(?:the\s+)?(?:total|whole|all)\b|(?:\bwhat|\bhow\s+many)\s*(?:%|per\s*cent)\s+of\b|'s\s+(?:share|slice|portion|percentage|proportion)\b|\bhow\s+much\s+of\s+(?:the\s+)?(?:total|whole|all)\b|\bshare\s+(?:does|did|do|has|had|is|was)\b/;

export const WEEKDAY_ASK = /\bwhich days? (?:is|are|was|were)\b|\bdays?[- ]of[- ](?:the[- ])?week\b|\bweekdays\b|\b(?:which|what|by|per|each|every|across)\s+(?:the\s+)?weekday\b|\bweekends?\s+(?:vs|versus|compared)\b/;

/** Cues for each kind of question, with weights; the reader scores a question's words with these. */
export const KIND_CUES = {
  performance: [
    /\bworth (?:it|keeping|the (?:money|cost|effort))\b/,
    /\b(?:is|was) it (?:working|worth)|\bdid it work\b|\bpaying off\b|\bpay(?:s|ing)? off\b|\bmake a difference\b/,
    /\b(?:impact|effect|effects|affect(?:ed)?|benefit|lift|uplift|incremental|cannibali[sz]\w*)\b/,
    /\bbefore and after\b|\bbefore (?:vs\.?|versus|v) after\b|\bpre[- ]and[- ]post\b|\bpre-? ?(?:vs\.?|versus)? ?post\b/,
    /\bthan (?:everyone|everybody|anyone) else\b|\bthan (?:the )?(?:rest|others|other customers|non-?\w+)\b|\b(?:vs\.?|versus|against|compared (?:to|with)) (?:the )?(?:rest|others|everyone else|non-?\w+)\b/,
    /\b(?:since|after|post)[- ](?:it|we|they)? ?(?:launch(?:ed)?|went live|started|rolled out|introduc\w+)\b|\bsince (?:the )?launch\b|\bpost-launch\b/,
    /\b(?:more|less|fewer) (?:often|frequently)\b|\bhow often\b|\btravel more\b|\bbook more\b|\bspend more\b|\bspend less\b/,
  ],
  kpi: [
    /\bwhat(?:'s|s|\s+is|\s+are)\b.{0,40}\blooking\s+like\b|\bwhere (?:does|do|did|is|are) .{0,60}\bst(?:an|oo)d\b|\bst(?:and|ood)(?:s|ing)? (?:at|right now|today|currently)\b|\bwhere we stand\b|\bwhere (?:are|is) .{1,40} (?:now|at)\b|\bhow are we doing\b|\bwhere .{0,40}\bstood\b/,
    /\bhow did (?:jan|feb|mar|apr|may|jun|jul|aug|sep|oct|nov|dec|q[1-4]|h[12]|last|this|yesterday)\w* (?:go|look|turn out|land)\b/,
    /\b(?:current(?:ly)?|right now|at the moment|as of (?:now|today)|latest(?! full| complete)(?<!at the latest)|snapshot|kpis?|headline (?:number|figure)s?|scorecard|month[- ]end|quarter[- ]end|flash (?:report|numbers?)|so far this month|month[- ]to[- ]date|mtd)\b/,
  ],
  growth: [
    /\bgr[eo]w(?:s|n|ing|th)?\b|\bdeclin\w*|\bincreas\w*|\bdecreas\w*|\bshr[iu]nk\w*|\bcontract\w*|\bexpand\w*/,
    /\b(?:up|down) (?:or|and) (?:down|up)\b|\b(?:up|down) on\b|\bup from\b|\bdown from\b|\b(?:is|are|was|were|'s|'re)\b(?:\s+\S+){0,5}\s+(?:up|down)\b(?=\s*(?:$|[?.!,]|on\b|from\b|vs\b|versus\b|compared\b|this\b|last\b|since\b|year\b|again\b|at all\b))|\b(?:rise|rising|rose|risen|fall|falling|fell|fallen|drop\w*\b(?!\s+(?:(?:it|this|that|them|these|those)\s+)?(?:in|into|onto)\s+(?:a|an|the|my|our|your|their)?\s*(?:board\s+|team\s+|slide\s+)?(?:deck|slides?|email|doc|document|report|presentation|pack|thread|channel|chat|sheet|spreadsheet|notes?|memo|update)\b)|dip\w*|jump\w*|surg\w*|climb\w*|slump\w*|plummet\w*|soar\w*|spike\w*|(?<!\b(?:a|an|the|my|our|your|their|this|that|these|those|some|few|of|in|on|to|for|into|one|two|three)\s+)slid\w*|slip\w*|recover\w*|bounce\w* back|rebound\w*)\b/,
    /\b(?:faster|slower|quicker|more quickly|more slowly|accelerat\w*|decelerat\w*|slow(?:ed|ing)? down|speed(?:ing)? up|momentum)\b/,
    /\bbeat(?:s|en)?\b|\bbeating\b|\bbetter or worse\b|\b(?:better|worse) than\b|\b(?:more|less|higher|lower|bigger|smaller) than (?:last|the (?:previous|prior|same)|a year)\b/,
    /\byear[- ](?:on|over)[- ]year\b|\byoy\b|\by\/y\b|\bcagr\b|\bgrowth rate\b|\brate of (?:change|growth|increase|decline)\b|\bhow (?:fast|quickly|much) .{0,40}\b(?:chang|rising|rose|grow|fall|increas|decreas|declin|climb)\w*/,
    /\bchang(?:e|ed|es|ing)\b|\bimprov\w*|\bworsen\w*|\bdeteriorat\w*|\bgetting (?:better|worse)\b|\btaking .{0,30}\baway\b/,
    // "has it gone up since March", "did delays come down", "are flights higher than in March":
    // a change from that period to the latest (issue 16), never a trend read over the stretch.
    /\b(?:go(?:ne|es|ing)?|went|come|came|coming|creep\w*|crept|tick\w*|head\w*|trend\w*|edg\w*|mov\w*)\s+(?:up|down|upwards?|downwards?)\b(?=.{0,80}\b(?:since|from|than|on|compared|vs\.?|versus|against)\b)|\b(?:go(?:ne|es|ing)?|went|come|came|coming)\s+(?:up|down)\b|\b(?:higher|lower|more|less|fewer|bigger|smaller|busier|quieter|better|worse)(?:\s+[a-z'-]+){0,3}?\s+than\s+(?:(?:it|they|that|this|we|there)\s+(?:was|were|did|had)\s+)?(?:in|during|over|for|at|back\s+in)\s+/,
  ],
  trend: [
    /\btrend\w*|\bover time\b|\bpattern\w*|\bseason\w*|\bhistor\w*|\bevolv\w*|\bevolution\b|\btrajector\w*|\bmoved\b|\bmovement\b|\btrack\w*/,
    SEASON_ASK,
    WEEKDAY_ASK,
    /\bmake[s]? up\b|\bshare of\b|\bshares\b|\bmix\b|\bsplit of\b|\bconcentrat\w*|\btop \d+\b|\btop (?:three|five|ten)\b|\bbottom \d+\b|\brank\w*|\bpareto\b|\blong tail\b|\bdistribution\b|\bbiggest\b|\blargest\b|\bsmallest\b|\bmost of\b|\bhighest\b|\blowest\b|\bbest\b|\bworst\b/,
    /\bmonth by month\b|\bweek by week\b|\bday by day\b|\bquarter by quarter\b|\byear by year\b|\bover the (?:years|months|weeks)\b|\blong[- ]term\b/,
  ],
} as const;

/** Words that only ask for a breakdown of the question before them ("which routes drove it"). */
export const REFINES_PREVIOUS = /^\s*(?:and\s+|also\s+|plus\s+)?(?:which|what)\b.*\b(?:drove|drive|driving|drives|behind|explain\w*|caused|cause|contribut\w*|responsible|account(?:ed|s)? for)\b|^\s*(?:and|also|plus)?\s*(?:split|broken down|break(?:ing)? (?:it |that |this )?down)\s+by\b|^\s*(?:and|also|plus|or)?\s*by\s+\w+(?:\s+(?:and|or)\s+\w+)?\s*\??\s*$/i;

/**
 * Words that open a clause saying what the whole request is about, before its questions ("For email
 * tickets, …", "Looking only at enterprise customers: …", "On rainy days, …"): its values reach
 * every question that does not name its own.
 */
export const FRAME_OPENING = /^\s*(?:for|on|in|among(?:st)?|within|excluding|except|without|just|only|looking\s+(?:only\s+|just\s+)?at|focus(?:ing|ed)?\s+on|thinking\s+about|talking\s+about|regarding|as\s+for|when\s+it\s+comes\s+to)\b/i;

/** Words by which a question asks about everything, not only the values the request named before ("overall", "across all channels"). */
export const OVERALL = /\b(?:overall|in\s+total|altogether|company[- ]wide|business[- ]wide|across\s+the\s+board|across\s+(?:all|every)\b|(?:for|in|of)\s+all\s+(?!of\b|them\b|those\b|these\b)|every\s+(?:channel|team|route|segment|one)\b|the\s+whole\s+(?:business|company|desk|network))/i;

/** A question about how often each unit does something, not a total. */
export const FREQUENCY = /\b(?:more|less) (?:often|frequently)\b|\bhow often\b|\bfrequenc\w+|\btravel (?:more|less)\b|\bbook (?:more|less)\b|\brepeat\b|\bper (?:customer|user|member|client|account|head)\b|\bonce a\b|\btimes a (?:month|year|week)\b/i;

/** Words that begin a new question inside one sentence (", whether ...", "and where ..."). */
export const QUESTION_JOINS = /,?\s+and\s+(?=(?:whether|where|which|how|what|why|when|is|are|was|were|did|does|do|has|have|can|could|will|should)\b)|,?\s+and\s+(?:say|tell\s+(?:me|us)|let\s+(?:me|us)\s+know|check|show|see)\s+(?=(?:whether|if|how|what|which)\b)|,\s+(?=(?:whether|where|which|how|what|why|when|also|plus)\b)|;\s*|\s+(?:also|plus),?\s+(?=(?:whether|where|which|how|what|why|can|could|is|are|did)\b)/i;

// ---- ordinary words ----

/** Function words: never data, never unknown. */
export const STOPWORDS = new Set(
  `a about above after again against all almost along already also although always am among an and another any anybody anyone anything anyway are aren around as at away
  back be became because become been before being below between both but by can cannot could couldn did didn do does doesn doing don done down during each either else enough especially even ever every
  few for from further get gets getting give given go goes going got had hadn has hasn have haven having he her here hers herself him himself his how however i if in into is isn it its itself just
  least less let like likely made make many may maybe me might mine more most much must my myself near nearly need neither never no nobody none nor not nothing now of off often on once one only onto or other others otherwise our ours ourselves out over own
  per perhaps please quite rather really same several shall she should shouldn since so some somebody someone something sometimes still such than that the their theirs them themselves then there these they thing things this those though through thus to too toward towards
  under until up upon us very via vs versus was wasn way we well were weren what whatever when whenever where whereas whether which while who whole whom whose why will with within without won would wouldn yet you your yours yourself yourselves
  hi hello hey dear thanks thank cheers regards best kind ta please pls plz thx ty ok okay yes no yeah yep nope sure fine great good nice lovely awesome
  first second third fourth fifth firstly secondly thirdly lastly finally non behalf regarding re one two three four five six seven eight nine ten twelve`.split(/\s+/),
);

/**
 * Request wording: verbs, analysis words, office nouns and the like. Never reported as unknown,
 * never taken for data. The analysis words of the trade (trend, share, growth...) are here too:
 * they are read as cues, not as names of things in the data.
 */
export const ORDINARY = new Set(
  `able ahead ask asked asking answer answers bit break breakdown broken briefly build call chance chart charts check clear compare compared comparing comparison could cover curious
  data dashboard deck detail details dig doing drill email emails explain figure figures find follow following fyi graph graphs help hope idea insight insights interested
  keen know last latest let list listed listing look looking looks meeting meetings mind need needed needs note notes number numbers overview picture plot prepare presentation pull put question questions quick quickly
  rank ranks ranked ranking read ready report reporting reports request review see send share show showing slide slides sort sorted stats summary summarise summarize table tables team tell thinking thought time today tomorrow understand update
  view want wanted wants week weeks wondering work working write yesterday year years month months quarter quarters day days half period periods date dates season
  trend trends trending growth grow growing grown grew change changes changed changing rate rates ratio share shares mix split pattern patterns seasonal seasonality
  top bottom best worst highest lowest biggest smallest largest most least fewest fewer average averages avg mean median typical total totals overall sum count counts volume volumes level levels
  up down higher lower more less increase decrease rise fall drop dip jump peak peaks trough busy busiest quiet quietest slow slowest fast faster slower strong weak
  vs versus against compared since until through between across within per each every both either whole full complete partial entire so far recent recently currently current now
  doing going looking performing perform performed performance move moved moving moves movement movements happen happened happening go went gone
  beat beaten drive drove driving driver drivers behind cause caused reason reasons explain explains impact effect effects worth difference differ differs different
  lately past previous prior next coming upcoming ago earlier later early late mid end start beginning ongoing so-called ytd mtd qtd yoy mom wow qoq ttm ltm
  business company firm org organisation organization everyone everybody people folks guys all team teams colleagues boss manager managers board leadership exec execs
  ops operations finance marketing sales commercial product strategy plan planning budget forecast target targets goal goals kpi kpis metric metrics measure measures figure
  thing stuff something anything everything lot lots bunch kind sort type way ways bit piece part parts point points side sides term terms case cases example instance
  morning afternoon evening tonight week weekend weekends weekday weekdays daily weekly monthly quarterly yearly annual annually
  say said says mention note apologies sorry long short brief clear simple view views methodology confidence interval intervals significance statistical statistically test tests p-value pvalue
  analysis deep-dive dive favour favor ask asks request requests note notes draft version cycle round funding planning session sessions`.split(/\s+/),
);

/**
 * Nouns that name a measure or a breakdown in most businesses. One of these that the catalog
 * does not know is reported as unknown wherever it appears: a request asking for profit on data
 * that has no profit must not be answered with revenue in silence.
 */
export const BUSINESS_NOUNS = new Set(
  `profit profits profitability margin margins cost costs expense expenses spend spending ebitda ebit earnings payroll wages salary salaries price prices pricing discount discounts
  nps csat ces churn retention conversion conversions roi roas ltv clv arpu aov headcount staff staffing employees fte utilisation utilization occupancy inventory stock stockouts
  region regions regional country countries city cities state states province provinces store stores shop shops branch branches site sites location locations department departments
  product products sku skus category categories segment segments brand brands supplier suppliers vendor vendors campaign campaigns market markets territory territories zone zones
  area areas division divisions unit units warehouse warehouses depot depots outlet outlets franchise franchises partner partners agent agents rep reps salesperson salespeople
  complaint complaints returns return delays delay cancellations weather temperature rainfall emissions carbon fuel energy age gender demographic demographics
  sessions pageviews clicks impressions visits visitors footfall downloads installs signups subscribers subscriptions leads deals pipeline quota`.split(/\s+/),
);

// ---- business words for the main kinds of metric ----

/** What an ordinary word asks to measure, when the catalog has exactly one metric of that role. */
export type MetricRole = 'amount' | 'count' | 'distinct' | 'average_amount';

export const ROLE_WORDS: { role: MetricRole; pattern: RegExp }[] = [
  { role: 'average_amount', pattern: /\b(?:average|avg|mean|typical)\s+(?:price|spend|ticket|basket|order value|transaction value|sale|value|amount|fare|bill|cheque|check)\b|\b(?:aov|atv|basket size)\b/ },
  { role: 'amount', pattern: /\b(?:money|takings|income|sales|turnover|revenues?|earnings|receipts|gross|box[- ]office|top line|topline|cash|billings?|how much (?:did we|have we|do we) (?:make|made|earn|take|bring)|how much we (?:made|make|took|earned))\b/ },
  { role: 'count', pattern: /\b(?:volume|volumes|how many|number of|no\.? of|count of|transactions|throughput|activity)\b/ },
  { role: 'distinct', pattern: /\b(?:unique|distinct|active)\s+(?:customers|users|clients|people|accounts|members)\b|\bhow many (?:customers|users|clients|people)\b/ },
];

/**
 * The bare words for how much of something there is ("what's our volume by month?"). Unless the
 * catalog calls a metric so, they name no measure of their own: a count of the data's rows, or of
 * another thing counted, is read for them only when it is the one such count, and said back.
 */
export const VOLUME_WORDS = /^(?:volumes?|throughput)$/;

/** Words that point back to the previous question's metric. */
export const PRONOUNS = new Set(['it', 'that', 'this', 'they', 'them', 'those', 'these', 'its', 'same', 'one']);

/** Words that ask for a breakdown by the noun after them. */
export const BREAKDOWN_BEFORE = /(?:\bby|\bper|\bfor each|\beach|\bevery|\bacross(?: (?:all|the|our))?|\bsplit (?:by|across|into)|\bbroken down by|\bbreak(?:ing)? (?:it |that |this |them )?down by|\bbreakdown (?:by|of)|\bgrouped by|\bwithin each|\bfor every|\bamong(?: the)?|\bbetween (?:the )?(?:different |\w+ )?)\s+$/;
export const BREAKDOWN_WH = /(?:\bwhich|\bwhat)\s+$/;

/**
 * A ranking of a breakdown's segments ("which species cause the most cost", "top 5 busiest
 * airports", "rank operators by repair cost"): a superlative of amount or a word of rank. Read only
 * where the clause names a breakdown. "most recent", "at most", "mostly" are not rankings.
 */
export const RANK_WORDS = /\b(?:most|highest|biggest|largest|greatest|top|bottom|worst|best|least|lowest|fewest|smallest|busiest|quietest|cheapest|costliest|priciest|dearest|leading|rank(?:ed|ing|s)?|league\s+table)\b(?!\s+(?:recent|recently|of\s+(?:the\s+)?(?:time|it|them)))/;
export const NOT_RANK = /\b(?:at\s+(?:the\s+)?most|on\s+top\s+of|at\s+least|top\s+up|bottom\s+line|best\s+regards|all\s+the\s+best)\b/g;

/**
 * The order a ranking's word asks for: the smallest first ("the fewest strikes", "least cost",
 * "bottom 5", "the quietest airports"), by the metric's direction ("worst", "best"), the largest
 * value first ("highest"), or none: "most", "top", "biggest" rank by size, the plain ranking.
 */
/**
 * A ranking's direction said as a run from one end to the other ("from top to bottom", "highest to
 * lowest", "least to most"): the first end comes first. Read before any single word of rank, so the
 * "bottom" of "top to bottom" does not turn the order round.
 */
export const RANK_RUN = /\b(?:from\s+)?(top|highest|most|biggest|largest|best|worst|lowest|least|fewest|smallest|bottom)\s+(?:down\s+|up\s+)?to\s+(?:the\s+)?(bottom|lowest|least|fewest|smallest|worst|best|top|highest|most|biggest|largest)\b/;

/** The order a run from one end to the other asks for ("top to bottom": highest first). */
export function rankRunOrder(text: string): RankOrder | undefined {
  const m = RANK_RUN.exec(text);
  if (!m) return undefined;
  const first = m[1]!;
  if (first === 'best' || first === 'worst') return first;
  return /^(?:lowest|least|fewest|smallest|bottom)$/.test(first) ? 'lowest' : 'highest';
}

export function rankOrderOf(word: string): RankOrder | undefined {
  const w = word.toLowerCase();
  if (/^(?:fewest|least|lowest|smallest|bottom|quietest|cheapest)$/.test(w)) return 'lowest';
  if (w === 'worst' || w === 'best' || w === 'highest') return w;
  return undefined;
}
/**
 * A ranking by growth rate ("which channel is growing fastest", "the fastest-growing shops", "the
 * highest growth rate", "which route is shrinking fastest"): each segment's own rate of change, not
 * its share of the total's change. Falling fastest is the lowest rate first.
 */
const FASTEST_GROWTH = /\b(?:fastest|quickest|most\s+(?:quickly|rapidly))\b|\b(?:highest|biggest|largest|greatest|strongest|best|top)\s+(?:(?:percentage|relative|yearly|annual)\s+)?(?:growth(?:\s+rates?)?|rates?\s+of\s+growth)\b|\bgr[eo]w\w*\s+(?:the\s+)?most\s+in\s+(?:percent(?:age)?|relative)\s+terms\b/;
const SLOWEST_GROWTH = /\b(?:slowest|least\s+(?:quickly|rapidly))\b|\b(?:lowest|smallest|weakest|worst)\s+(?:(?:percentage|relative|yearly|annual)\s+)?(?:growth(?:\s+rates?)?|rates?\s+of\s+growth)\b/;
const DECLINE = /\b(?:shr[iu]nk\w*|declin\w*|fall\w*|fell|drop\w*|los(?:e|ing|t)|decreas\w*|contract\w*)\b/;
export function growthRankOf(text: string): GrowthRank | undefined {
  const t = text.toLowerCase();
  if (FASTEST_GROWTH.test(t)) return DECLINE.test(t) ? 'slowest' : 'fastest';
  if (SLOWEST_GROWTH.test(t)) return 'slowest';
  return undefined;
}
/** Asks which segment: "which X", "what X", "who", or a rank list ("top 5", "bottom 3", "rank X by"). */
export const RANK_ASK = /\b(?:which|what|who|whose)\b|\b(?:top|bottom)\s+(?:\d{1,2}|three|five|ten)\b|\brank\w*\b|\bleague\s+table\b/;

// ---- the two ends of a journey ----

/** Words of a breakdown's names that make it the start of a movement (origin, from, pickup) or its end (destination, to, dropoff). */
export const FROM_END_WORDS = new Set(['origin', 'origins', 'from', 'departure', 'departures', 'departing', 'source', 'sources', 'start', 'starting', 'pickup', 'pick', 'sender', 'outbound', 'leaving']);
export const TO_END_WORDS = new Set(['destination', 'destinations', 'to', 'arrival', 'arrivals', 'arriving', 'target', 'targets', 'end', 'dropoff', 'drop', 'recipient', 'inbound', 'bound']);
/** Words right before a value that put it at the start ("from LAX", "out of DFW") or the end ("into SFO", "arriving at SEA"). */
export const FROM_END_CUE = /(?:\bfrom|\bout\s+of|\bleaving|\bdeparting(?:\s+from)?|\bdepartures?\s+(?:from|at)|\boriginating\s+(?:at|in|from))\s+(?:the\s+)?$/;
export const TO_END_CUE = /(?:\bto|\binto|\barriving\s+(?:at|in|into)|\barrivals?\s+(?:at|in|into)|\bbound\s+for|\bheaded\s+for|\bheading\s+(?:to|for)|\blanding\s+(?:at|in))\s+(?:the\s+)?$/;
/** What joins the two ends named together: "LAX to SFO", "LAX→SFO", "LAX-SFO", "LAX > SFO". */
export const ENDS_JOIN = /^\s*(?:to|→|->|—|–|-|>|›|\/)\s*$/;
