using System.Runtime.InteropServices;
using System.Text;

namespace Triage.Testing.LightGbm;

/// <summary>
/// LightGBM's C API (c_api.h of LightGBM 4.6.0, from the <c>LightGBM</c> NuGet package's
/// lib_lightgbm.so), used as the external reference for predictions and TreeSHAP contributions.
/// </summary>
internal sealed unsafe partial class LightGbmBooster : IDisposable
{
    public const int PredictNormal = 0, PredictRaw = 1, PredictContrib = 3;
    private const string Lib = "lib_lightgbm";
    private const int Float32 = 0, Float64 = 1;
    private IntPtr _booster;

    private LightGbmBooster(IntPtr booster) => _booster = booster;

    /// <summary>Trains on row-major <paramref name="x"/> (NaN = missing) with 0/1 labels.</summary>
    public static LightGbmBooster Train(double[] x, float[] labels, int columns, string datasetParameters, string boosterParameters, int iterations)
    {
        var rows = labels.Length;
        IntPtr dataset;
        fixed (double* data = x) Check(LGBM_DatasetCreateFromMat(data, Float64, rows, columns, 1, datasetParameters, IntPtr.Zero, out dataset));
        try
        {
            fixed (float* label = labels) Check(LGBM_DatasetSetField(dataset, "label", label, rows, Float32));
            Check(LGBM_BoosterCreate(dataset, boosterParameters, out var booster));
            var native = new LightGbmBooster(booster);
            for (var i = 0; i < iterations; i++)
            {
                Check(LGBM_BoosterUpdateOneIter(booster, out var finished));
                if (finished != 0) break;
            }
            return native;
        }
        finally
        {
            LGBM_DatasetFree(dataset);
        }
    }

    public string ModelText()
    {
        Check(LGBM_BoosterSaveModelToString(_booster, 0, -1, 0, 0, out var length, null));
        var buffer = new byte[length];
        fixed (byte* b = buffer) Check(LGBM_BoosterSaveModelToString(_booster, 0, -1, 0, length, out length, b));
        return Encoding.UTF8.GetString(buffer, 0, (int)length - 1); // drop the terminating NUL
    }

    /// <summary>One value per row, or columns + 1 per row (expected value last) for contributions.</summary>
    public double[] Predict(double[] x, int columns, int predictType, string parameters = "num_threads=1")
    {
        var rows = x.Length / columns;
        var result = new double[rows * (predictType == PredictContrib ? columns + 1 : 1)];
        fixed (double* data = x)
        fixed (double* output = result)
            Check(LGBM_BoosterPredictForMat(_booster, data, Float64, rows, columns, 1, predictType, 0, -1, parameters, out _, output));
        return result;
    }

    public void Dispose()
    {
        if (_booster == IntPtr.Zero) return;
        LGBM_BoosterFree(_booster);
        _booster = IntPtr.Zero;
    }

    private static void Check(int status)
    {
        if (status != 0) throw new InvalidOperationException("LightGBM: " + Marshal.PtrToStringUTF8(LGBM_GetLastError()));
    }

    [LibraryImport(Lib)] private static partial IntPtr LGBM_GetLastError();

    [LibraryImport(Lib, StringMarshalling = StringMarshalling.Utf8)]
    private static partial int LGBM_DatasetCreateFromMat(void* data, int dataType, int rows, int columns, int rowMajor, string parameters, IntPtr reference, out IntPtr dataset);

    [LibraryImport(Lib, StringMarshalling = StringMarshalling.Utf8)]
    private static partial int LGBM_DatasetSetField(IntPtr dataset, string field, void* data, int count, int type);

    [LibraryImport(Lib)] private static partial int LGBM_DatasetFree(IntPtr dataset);

    [LibraryImport(Lib, StringMarshalling = StringMarshalling.Utf8)]
    private static partial int LGBM_BoosterCreate(IntPtr dataset, string parameters, out IntPtr booster);

    [LibraryImport(Lib)] private static partial int LGBM_BoosterUpdateOneIter(IntPtr booster, out int finished);

    [LibraryImport(Lib)]
    private static partial int LGBM_BoosterSaveModelToString(IntPtr booster, int startIteration, int iterations, int importanceType, long bufferLength, out long length, byte* text);

    [LibraryImport(Lib, StringMarshalling = StringMarshalling.Utf8)]
    private static partial int LGBM_BoosterPredictForMat(IntPtr booster, void* data, int dataType, int rows, int columns, int rowMajor, int predictType,
        int startIteration, int iterations, string parameters, out long length, double* result);

    [LibraryImport(Lib)] private static partial int LGBM_BoosterFree(IntPtr booster);
}
