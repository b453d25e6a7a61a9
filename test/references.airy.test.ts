// Airy functions Ai, Ai', Bi, Bi' of complex argument, their real zeros and Fock's w(t) against the handbook
// tables, an arbitrary-precision library, the Wronskian and the large-argument forms.
import { describe, expect, it } from 'vitest';
import { type C, abs, add, c, fromPolar, mul, scale, sub } from '../solver/references/complex.js';
import { airy, airyAi, airyAiZero, airyAipZero, fockW } from '../solver/references/airy.js';
import { expectComplexClose, expectRealClose } from './references.expect-close.js';

// mpmath 1.3.0 at 30 digits (scripts/airy-reference-values.py): rows [x, y, Re Ai, Im Ai, Re Ai', Im Ai',
// Re Bi, Im Bi, Re Bi', Im Bi'] at z = x + jy, on rings |z| = 0.3 … 40 on both sides of the method switches at
// 1.5 and 9, at arguments in every Stokes sector.
const MPMATH_AIRY: ReadonlyArray<readonly number[]> = [
  [0.29999999999999999, 0.0, 0.27880648195500492, 0.0, -0.2451463642190548, 0.0, 0.75248558508731563, 0.0, 0.48004902875244802, 0.0],
  [-0.15145383137995724, 0.25896280999466215, 0.39591686349449825, -0.067147085475827162, -0.26899728746205965, -0.013989089315773936, 0.54964366899421587, 0.11639538502780849, 0.43873687206050299, -0.024093833460774533],
  [-0.28266670220059742, -0.10049644504677148, 0.42732184249970683, 0.024475387729471038, -0.24521401851164235, 0.01204515591852292, 0.48683389997864389, -0.047117834939884842, 0.46765915879296287, 0.013974957631965313],
  [1.105273192803462, 0.46730201077038058, 0.10460542259880696, -0.067028127374166728, -0.13988706721156775, 0.064003476812557519, 1.1615350137226135, 0.45977983851380021, 0.81308541234984241, 0.61683818225751581],
  [0.084884642001243488, -1.1969939839248653, 0.2641829031307537, 0.39312439047850031, -0.4597651143175961, -0.20418613800943138, 0.6793184461031581, -0.34346914497152925, -0.041882790198368612, 0.13503094507462124],
  [-1.1999999999957751, 3.1843077518824182e-6, 0.52619437480577358, 3.408214557192284e-7, 0.10703156926759647, -2.0106777920150546e-6, -0.015821370182186182, 1.9160303187187344e-6, 0.60171015744128557, 6.0456134052910045e-8],
  [1.7, 0.0, 0.054324792732919471, 0.0, -0.077374889525325032, 0.0, 2.3194075069389248, 0.0, 2.5558493569004378, 0.0],
  [0.91851391997583753, 1.4305006741734241, -0.024854180752448563, -0.21814587511062525, -0.084897836602036916, 0.28332696621742578, 0.42437945038016995, 0.47829190222850746, -0.43603524635423553, 0.62311834421406725],
  [-1.3619441464297872, -1.0174026449767259, 0.91468248474793628, -0.15729627335649745, -0.014399703491980188, 0.93723322012948752, -0.14038744998167729, -0.77351054159800237, 1.1319591075967959, 0.062989606571112345],
  [2.8660094673768182, 0.88656061998401869, -3.6630713692778826e-5, -9.3173870055654175e-3, -2.1632023344359167e-3, 0.016648388852013492, 1.4998526033024723, 9.7798357617933471, -0.47361417596170846, 16.338222716695594],
  [1.0870732634300206, -2.7961172579016789, -0.41125122959205177, -0.2310644214381954, 0.81298812159021136, -0.03254265959488772, -0.42421078157834453, 0.39460822398459383, -0.322098596749541, -0.63268192583103965],
  [-1.7655033517660372, 2.4254892114587707, 6.7195899670531861, -0.055579663272019013, -4.9499782329369528, -9.7988678192079516, 0.061899509686854221, 6.7073572262070769, 9.8237442946439481, -4.9499771782016347],
  [-2.9699774898013365, 0.42336002417960167, -0.4704784491677367, 0.16597039980400113, 0.4840571922728742, 0.49634726346264859, -0.28086906108255374, -0.30039672166031194, -0.81645869171401409, 0.3173573801125514],
  [5.0, 0.0, 1.0834442813607442e-4, 0.0, -2.4741389086846248e-4, 0.0, 657.79204417117118, 0.0, 1.4358190802179825e+3, 0.0],
  [2.4999893963627282, 4.3301331409177157, 0.027775307316477785, -0.18648138456420579, -0.25527116109860164, 0.33629062620331565, 0.42105851077031629, 0.32297876298097658, -0.23044543314477418, 0.58242678632428782],
  [-2.080734182735712, -4.5464871341284088, 6.2533691873114255, 305.15166848961267, -566.75058402496667, -350.60215284493844, 305.15186746052515, -6.2534913631319885, -350.60214361437424, 566.75005101075017],
  [-4.8547908257479522, 1.1962466460699117, 2.6672969656140268, -0.12468620042395167, -0.8642039190569176, -5.8085308783725744, 0.12915539309926033, 2.640910859467475, 5.8688836856914065, -0.86256604559535751],
  [8.3305659116505542, 1.6886893117580204, 4.9917686172238904e-9, 2.2456123564652903e-8, -8.2092200437608064e-9, -6.7201938498759086e-8, 2.8081335016200884e+5, -2.3568565988854762e+6, 1.5070148326131843e+6, -6.683995374941703e+6],
  [-1.9312178048912401, -8.2777048624646596, 1.7209261295724945e+5, 4.7867588627263935e+5, -1.3898743253972806e+6, -4.764306136335996e+5, 4.7867588627274103e+5, -1.7209261295728381e+5, -4.7643061363349406e+5, 1.3898743253969831e+6],
  [-7.6846132071450199, 3.6327289819875546, 4.1823766226090964e+3, -924.55794984115788, -5.175298510331363e+3, -1.1281482483687624e+4, 924.55795524747441, 4.1823766110688732e+3, 1.1281482520256729e+4, -5.1752985025503586e+3],
  [9.3106324894917947, -1.8873586425530815, 1.1392257263558214e-9, -5.7217291535976409e-10, -3.3494159917653056e-9, 2.1141081595129659e-9, 3.4202866604358153e+7, 2.1708710352458829e+7, 1.1079370420502303e+8, 5.5292127831303656e+7],
  [0.67200341584317769, 9.4762023727385163, -3.37028211970519e+4, -5.0017515482055559e+3, 6.5710798787100795e+4, 8.1204625826539784e+4, 5.0017515472601568e+3, -3.3702821195867485e+4, -8.1204625831189616e+4, 6.5710798787759471e+4],
  [-8.1404431570049987, -4.8972630323039104, 2.2489598117531293e+5, -4.7165797115638901e+4, -4.0781433430505375e+4, 7.0269493683970073e+5, -4.7165797115624554e+4, -2.2489598117508867e+5, 7.0269493684038196e+5, 4.0781433430652406e+4],
  [13.163738428355591, 7.1913830790630451, 1.2634709347122388e-14, -6.9440401592854078e-14, -1.1359070885596841e-13, 2.4958478019550887e-13, 2.4272747345637779e+11, 5.2921635133915483e+11, 3.958796919300088e+11, 2.2127194734147133e+12],
  [-8.8275167588301855, -12.127446057293852, 4.3780763592268653e+15, 3.8710504357442624e+15, -2.0956534966071623e+16, 8.2898744110403227e+15, 3.8710504357442624e+15, -4.3780763592268653e+15, 8.2898744110403227e+15, 2.0956534966071623e+16],
  [-14.987027254099193, 0.62370993649935869, 1.590846211357877, 0.28285299420794049, 1.0111210362316977, -6.0795727801576315, -0.28687926001497382, 1.5655413872259913, 6.1771875550607374, 0.99306844563745138],
  [29.850124958340771, 2.9950024994048445, -8.4862940512320565e-49, 6.962344226213065e-49, 4.8393548323441721e-48, -3.5828084982981845e-48, -2.1279190977052046e+46, -1.5746536204774035e+46, -1.1190437527212158e+47, -9.1851481730477375e+46],
  [-9.6986870059051018, -28.389002630622436, 3.7867641608823522e+44, 2.3244369118104321e+44, -2.2392027360603939e+45, 9.4416236089841816e+44, 2.3244369118104321e+44, -3.7867641608823522e+44, 9.4416236089841816e+44, 2.2392027360603939e+45],
  [-29.699774898013363, -4.233600241796017, 1.1408429817299658e+9, 5.9641974369400932e+8, -3.690446903434841e+9, 6.0055416680117003e+9, 5.9641974369400932e+8, -1.1408429817299658e+9, 6.0055416680117003e+9, 3.690446903434841e+9],
  [39.950010415798651, -1.9991667708271332, 1.0191697349607664e-74, 8.514931968078342e-76, -6.4635629417874797e-74, -3.7808183701401276e-75, 2.4563732162424693e+72, -1.4350158898597458e+71, 1.5492510377001238e+73, -1.2955204798458509e+72],
  [-16.645873461885696, 36.37189707302727, 2.4607293712191547e+71, 2.7027295747010765e+71, 5.9660127701971495e+71, -2.231045759955963e+72, -2.7027295747010765e+71, 2.4607293712191547e+71, 2.231045759955963e+72, 5.9660127701971495e+71],
  [-39.99999999985917, -1.0614359172941394e-4, -0.045933933983838886, 1.4744310577652155e-4, -1.3890911877460125, -1.950236806689342e-4, 0.21958867372306292, 3.0690354254178233e-5, -0.28914000790775454, 9.3231708111183527e-4],
];

// Same source: [s, a_s, a'_s], the s-th zeros of Ai and Ai' (mpmath's airyaizero).
const MPMATH_ZEROS: ReadonlyArray<readonly [number, number, number]> = [
  [1, -2.338107410459767, -1.0187929716474711],
  [2, -4.0879494441309706, -3.2481975821798365],
  [3, -5.5205598280955511, -4.8200992111787356],
  [4, -6.786708090071759, -6.1633073556394865],
  [10, -12.828776752865757, -12.384788371845747],
  [50, -38.021008677255254, -37.765659100538871],
  [100, -60.455557274116699, -60.253295964424793],
];

/**
 * Relative accuracy claimed for Ai, Ai', Bi, Bi' at |z| (airy.ts, measured): a few ulps up to the asymptotic
 * region, then growing like |z|^{3/2}, which is the condition number |z·Ai'/Ai| ≈ |z|^{3/2} of the functions
 * themselves (the phase ζ = (2/3)z^{3/2} is rounded): 2e-14 + 2e-15·|z|^{3/2}, i.e. 5.3e-13 at |z| = 40 where the
 * worst measured error is 3.1e-13, and 8e-14 at |z| = 9.5 (measured 2.7e-14).
 */
const claimed = (z: C): number => 2e-14 + 2e-15 * abs(z) ** 1.5;

describe('Airy functions of real argument', () => {
  it.each([
    // Abramowitz & Stegun, Handbook of Mathematical Functions (1964), Table 10.11 (entries from memory, each
    // confirmed by mpmath 1.3.0 to every digit); x = 0 from A&S 10.4.4–10.4.5 (from memory, confirmed likewise).
    // Tolerance: half a unit of the last decimal quoted.
    { x: 0, ai: 0.355028053887817, aip: -0.258819403792807, bi: 0.614926627446001, bip: 0.448288357353826, half: 5e-16 },
    { x: 1, ai: 0.1352924163, aip: -0.1591474413, bi: 1.207423595, bip: 0.9324359334, half: 5e-11 },
    { x: -1, ai: 0.5355608833, aip: -0.0101605671, bi: 0.1039973895, bip: 0.5923756264, half: 5e-11 },
  ])("when x = $x then Ai, Ai', Bi, Bi' match the handbook table", ({ x, ai, aip, bi, bip, half }) => {
    const v = airy(c(x));
    expectRealClose(`Ai(${x})`, v.ai.re, ai, 0, half);
    expectRealClose(`Ai'(${x})`, v.aip.re, aip, 0, half);
    expectRealClose(`Bi(${x})`, v.bi.re, bi, 0, half);
    expectRealClose(`Bi'(${x})`, v.bip.re, bip, 0, half);
    // real on the real axis: the imaginary parts are rounding only (a few ulps of the value)
    for (const part of [v.ai, v.aip, v.bi, v.bip]) expect(Math.abs(part.im)).toBeLessThan(1e-15);
  });
});

describe('Airy functions of complex argument', () => {
  it("when z runs over rings |z| = 0.3 … 40 in every sector then Ai, Ai', Bi, Bi' agree with mpmath", () => {
    for (const [x, y, ...v] of MPMATH_AIRY) {
      const z = c(x, y);
      const got = airy(z);
      const tol = claimed(z);
      expectComplexClose(`Ai(${x} + ${y}j)`, got.ai, c(v[0], v[1]), tol);
      expectComplexClose(`Ai'(${x} + ${y}j)`, got.aip, c(v[2], v[3]), tol);
      expectComplexClose(`Bi(${x} + ${y}j)`, got.bi, c(v[4], v[5]), tol);
      expectComplexClose(`Bi'(${x} + ${y}j)`, got.bip, c(v[6], v[7]), tol);
    }
  });

  it("when z is anywhere with |z| ≤ 40 then the Wronskian Ai·Bi' − Ai'·Bi equals 1/π", () => {
    // A&S 10.4.10 (from memory): W{Ai, Bi} = 1/π. Bi is built from Ai at ωz and ω̄z, so this ties together Ai at
    // three points and all three methods (series, Taylor integration, asymptotic expansion). Tolerance: the claimed
    // accuracy applied to each product, which can be far larger than 1/π where Ai and Bi are both large.
    for (const r of [0.4, 1.49, 1.51, 2.5, 5, 8.99, 9.01, 14, 25, 40]) {
      for (let i = 0; i < 16; i++) {
        const z = fromPolar(r, -Math.PI + ((i + 0.37) * 2 * Math.PI) / 16);
        const v = airy(z);
        const p1 = mul(v.ai, v.bip);
        const p2 = mul(v.aip, v.bi);
        const tol = 2 * claimed(z) * (abs(p1) + abs(p2)) * Math.PI;
        expectComplexClose(`W(${z.re} + ${z.im}j)`, sub(p1, p2), c(1 / Math.PI), tol);
      }
    }
  });

  it("when z crosses a switch between methods (|z| = 1.5 or 9) then Ai moves by Ai'·dz", () => {
    // Continuity across the switches: Ai(z + dz) − Ai(z) = Ai'(z)·dz + Ai''(z)·dz²/2 + …, Ai'' = z·Ai (the Airy
    // equation), with |dz| = 2e-7 straddling the switch. Tolerance: the claimed accuracy of the two values plus
    // the dropped third-order term |dz|³·|Ai'''|/6, Ai''' = Ai + z·Ai', relative to |Ai|.
    for (const r of [1.5, 9]) {
      for (const phi of [0.3, 1.2, 2.0, 2.9, -0.7, -2.4]) {
        const dir = fromPolar(1, phi);
        const z0 = scale(dir, r - 1e-7);
        const dz = scale(dir, 2e-7);
        const a = airyAi(z0);
        const b = airyAi(add(z0, dz));
        const predicted = add(a.ai, add(mul(a.aip, dz), scale(mul(mul(z0, a.ai), mul(dz, dz)), 0.5)));
        const tol = 2 * claimed(z0) + ((2e-7) ** 3 * (abs(a.ai) + r * abs(a.aip))) / (6 * abs(a.ai));
        expectComplexClose(`Ai at |z| = ${r}, arg ${phi}`, b.ai, predicted, tol);
      }
    }
  });

  it('when the input is NaN then the output is NaN', () => {
    const v = airyAi(c(Number.NaN, 0));
    expect(Number.isNaN(v.ai.re) && Number.isNaN(v.aip.im)).toBe(true);
  });
});

describe("zeros of Ai and Ai'", () => {
  it.each([
    // A&S Table 10.13 (8 decimals, from memory; every digit confirmed by mpmath's airyaizero, the next test).
    // Tolerance: half a unit of the eighth decimal.
    { s: 1, a: -2.33810741, ap: -1.01879297 },
    { s: 2, a: -4.08794944, ap: -3.24819758 },
    { s: 3, a: -5.52055983, ap: -4.82009921 },
  ])("when s = $s then a_s and a'_s match the handbook table", ({ s, a, ap }) => {
    expectRealClose(`a_${s}`, airyAiZero(s), a, 0, 5e-9);
    expectRealClose(`a'_${s}`, airyAipZero(s), ap, 0, 5e-9);
  });

  it("when s runs from 1 to 100 then a_s and a'_s agree with mpmath to 1e-15 relative", () => {
    // Measured ≤ 2.2e-16 (airy.ts); 1e-15 allows a few ulps for the condition of the zero.
    for (const [s, a, ap] of MPMATH_ZEROS) {
      expectRealClose(`a_${s}`, airyAiZero(s), a, 1e-15);
      expectRealClose(`a'_${s}`, airyAipZero(s), ap, 1e-15);
    }
  });

  it('when the index is not a positive integer then the zero function says so', () => {
    expect(() => airyAiZero(0)).toThrow(/index s must be an integer ≥ 1 \(got 0\)/);
    expect(() => airyAipZero(1.5)).toThrow(/index s must be an integer ≥ 1/);
  });
});

describe("Fock's Airy function w(t) = w2(t) for e^{jωt}", () => {
  it("when t is complex then w = √π(Bi − j·Ai) and w' = √π(Bi' − j·Ai')", () => {
    // The definition (Fock, from memory) against the rotation form airy.ts uses (A&S 10.4.7, 10.4.9).
    // Tolerance: twice the claimed accuracy, times (|Bi| + |Ai|)·√π/|w| for the cancellation in Bi − jAi.
    for (const t of [c(0.7, -0.2), c(-3, 1.5), c(2.2, -4.1), c(-12, -0.3), c(18, 9), c(6.5, -11.2)]) {
      const v = airy(t);
      const f = fockW(t);
      const w = scale(sub(v.bi, mul(c(0, 1), v.ai)), Math.sqrt(Math.PI));
      const wp = scale(sub(v.bip, mul(c(0, 1), v.aip)), Math.sqrt(Math.PI));
      const spread = (x: C, y: C, s: C) => (Math.sqrt(Math.PI) * (abs(x) + abs(y))) / abs(s);
      expectComplexClose(`w(${t.re} + ${t.im}j)`, f.w, w, 2 * claimed(t) * spread(v.bi, v.ai, w));
      expectComplexClose(`w'(${t.re} + ${t.im}j)`, f.wp, wp, 2 * claimed(t) * spread(v.bip, v.aip, wp));
    }
  });

  it('when t → −∞ then w(t) ~ (−t)^{−1/4}·e^{−j((2/3)(−t)^{3/2} + π/4)}, a wave going up for e^{jωt}', () => {
    // From Ai(−s), Bi(−s) ~ π^{−1/2}s^{−1/4}·(sin, cos)(ξ + π/4), ξ = (2/3)s^{3/2} (A&S 10.4.60, 10.4.64; from
    // memory). The first correction is of relative size 5/(72ξ) (u_1 = 5/72); tolerance twice that.
    for (const s of [20, 50, 120]) {
      const xi = (2 / 3) * s ** 1.5;
      const want = fromPolar(s ** -0.25, -(xi + Math.PI / 4));
      expectComplexClose(`w(−${s})`, fockW(c(-s)).w, want, 2 * (5 / (72 * xi)));
    }
  });
});
